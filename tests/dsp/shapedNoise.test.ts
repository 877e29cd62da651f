// Seeded noise of a given density (src/dsp/shapedNoise.ts): its mean square is the density's
// integral from 0 to fs/2 (Parseval), its Welch density follows the target (Welch, IEEE Trans. AU-15,
// 1967), and the same seed gives the same bits.
import { describe, expect, test } from 'vitest';
import { addShapedNoise, interpolatedDensity } from '../../src/dsp/shapedNoise.js';
import { welch } from '../../src/dsp/welch.js';
import { expectClose } from '../helpers/expectClose.js';

const RATE = 48000;
const CORNER_HZ = 1000;
// A first-order low-pass shape: S(f) = S0 / (1 + (f / fc)^2); its integral to fs/2 is S0 fc atan(fs / 2 fc).
const S0 = 1e-6;
const density = (hz: number): number => S0 / (1 + (hz / CORNER_HZ) ** 2);

function noise(seed: number, length = 1 << 19): Float32Array {
  const target = new Float32Array(length);
  addShapedNoise(target, RATE, density, seed);
  return target;
}

describe('shaped noise', () => {
  const signal = noise(7);

  test('mean square = integral of the density over 0..fs/2', () => {
    let sum = 0;
    for (const x of signal) sum += x * x;
    expectClose(sum / signal.length, S0 * CORNER_HZ * Math.atan(RATE / 2 / CORNER_HZ), { rtol: 0.03 });
  });

  test('Welch density follows the target within 0.5 dB, two decades apart', () => {
    const result = welch(Float64Array.from(signal), RATE, { segmentLength: 4096 });
    for (const hz of [100, 3000, 12000]) {
      // Average 9 bins around the frequency to tame the estimate's variance.
      const k = Math.round(hz / result.binHz);
      let mean = 0;
      for (let j = k - 4; j <= k + 4; j++) mean += result.values[j] / 9;
      expectClose(10 * Math.log10(mean), 10 * Math.log10(density(hz)), { atol: 0.5 });
    }
  });

  test('the same seed gives the same bits; another seed other bits', () => {
    expect(noise(7, 10000)).toEqual(noise(7, 10000));
    expect(noise(8, 10000)).not.toEqual(noise(7, 10000));
    // A shorter take gets the start of the same stream shape, not an error at the edges.
    expect(noise(7, 100).every(Number.isFinite)).toBe(true);
  });

  test('interpolatedDensity is log-log linear between points and held beyond them', () => {
    const d = interpolatedDensity([{ hz: 100, density: 1e-6 }, { hz: 1000, density: 1e-8 }]);
    expectClose(d(316.22776601683796), 1e-7, { rtol: 1e-9 });
    expect(d(10)).toBe(1e-6);
    expect(d(20000)).toBe(1e-8);
  });
});
