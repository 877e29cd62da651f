// Tests for src/dsp/iir.ts (direct form II transposed, unrolled up to order 3, general above).
import { describe, expect, test } from 'vitest';
import { createIirFilter } from '../../src/dsp/iir.js';
import type { DigitalTransferFunction } from '../../src/dsp/bilinear.js';
import { expectClose } from '../helpers/expectClose.js';

function digital(b: number[], a: number[]): DigitalTransferFunction {
  return { domain: 'digital', b, a, sampleRate: 48000 };
}

/**
 * Impulse response by the direct form I difference equation y[n] = sum b[k] x[n-k] - sum a[k] y[n-k]
 * (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed., eq. 6.1), an independent form.
 */
function directFormImpulse(tf: DigitalTransferFunction, length: number): Float64Array {
  const h = new Float64Array(length);
  for (let n = 0; n < length; n++) {
    let y = n < tf.b.length ? tf.b[n] : 0;
    for (let k = 1; k < tf.a.length && k <= n; k++) y -= tf.a[k] * h[n - k];
    h[n] = y;
  }
  return h;
}

const CASES: [string, DigitalTransferFunction][] = [
  ['order 0', digital([0.7], [1])],
  ['order 1', digital([0.2, -0.1], [1, -0.9])],
  ['order 2', digital([0.3, 0.1, -0.05], [1, -1.2, 0.5])],
  ['order 3', digital([0.1, 0.2, 0.2, 0.1], [1, -1.1, 0.6, -0.1])],
  ['order 4 (general loop)', digital([0.05, 0.1, 0.2, 0.1, 0.05], [1, -1.5, 1.1, -0.4, 0.06])],
  ['numerator longer than denominator', digital([0.25, 0.5, 0.25], [1, -0.5])],
];

describe('IIR filter', () => {
  test.each(CASES)('impulse response matches the direct form I recursion (%s)', (_name, tf) => {
    const block = new Float64Array(200);
    block[0] = 1;
    createIirFilter(tf).process(block);
    const expected = directFormImpulse(tf, block.length);
    for (let n = 0; n < block.length; n++) expectClose(block[n], expected[n], { atol: 1e-14 });
  });

  test('first order: h[n] = (b1 - a1 b0) (-a1)^(n-1) for n >= 1 (geometric series of 1 / (1 + a1 z^-1))', () => {
    const [b0, b1, a1] = [0.2, -0.1, -0.9];
    const block = new Float64Array(50);
    block[0] = 1;
    createIirFilter(digital([b0, b1], [1, a1])).process(block);
    expectClose(block[0], b0, { atol: 1e-15 });
    for (let n = 1; n < block.length; n++) expectClose(block[n], (b1 - a1 * b0) * (-a1) ** (n - 1), { atol: 1e-14 });
  });

  test.each(CASES)('block boundaries and reset do not change the result (%s)', (_name, tf) => {
    const input = new Float64Array(300);
    for (let n = 0; n < input.length; n++) input[n] = Math.sin(n * 0.3) + 0.5 * Math.sin(n * 0.071);
    const filter = createIirFilter(tf);
    const whole = input.slice();
    filter.process(whole);
    filter.reset();
    const pieces = input.slice();
    for (const [from, to] of [[0, 1], [1, 137], [137, 137], [137, 300]]) filter.process(pieces.subarray(from, to));
    expect(pieces).toEqual(whole);
  });
});
