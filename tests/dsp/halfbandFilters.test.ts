// Tests for src/dsp/halfbandFilters.ts: the WebAssembly polyphase kernels (written out for arm
// halves up to MAX_UNROLLED_HALF_ARM, a loop over the taps beyond), odd block lengths included,
// against the FIR definition y[n] = sum_k h[k] x[n - k] with the full impulse response (Crochiere &
// Rabiner, Multirate Digital Signal Processing, 1983, eqs. 2.56 and 2.75: interpolation =
// zero-stuffing then filtering, decimation = filtering then keeping every second).
import { describe, expect, it } from 'vitest';
import { designHalfband, halfbandImpulseResponse } from '../../src/dsp/halfband.js';
import { HalfbandDecimator, HalfbandInterpolator } from '../../src/dsp/halfbandFilters.js';
import { arenaLength, KernelArena } from '../../src/wasm/halfbandKernels.js';
import { MAX_UNROLLED_HALF_ARM } from '../../src/wasm/halfbandWat.js';
import { expectClose } from '../helpers/expectClose.js';

function convolve(h: Float64Array, x: Float64Array, n: number): number {
  let sum = 0;
  for (let k = 0; k < h.length && k <= n; k++) sum += h[k] * x[n - k];
  return sum;
}

function testSignal(length: number): Float64Array {
  const x = new Float64Array(length);
  for (let n = 0; n < length; n++) x[n] = Math.sin(n * 0.37) + 0.3 * Math.cos(n * 1.9);
  return x;
}

// Transition widths giving arm halves from 4 (written-out kernels) to beyond MAX_UNROLLED_HALF_ARM
// (the looped kernel).
const WIDTHS = [0.45, 0.4, 0.3, 0.25, 0.2, 0.1, 0.03];

/** An arena with room for the filter and an output of `outputLength`. */
function arenaFor(filterLengths: number[], outputLength: number): { arena: KernelArena; output: Float64Array } {
  const arena = new KernelArena(arenaLength([...filterLengths, outputLength]));
  return { arena, output: arena.allocate(outputLength) };
}

describe('half-band kernels', () => {
  it('the widths cover generated and general kernels', () => {
    const halfArms = WIDTHS.map((w) => designHalfband(w, 101).armTaps.length / 2);
    expect(Math.min(...halfArms)).toBeLessThanOrEqual(MAX_UNROLLED_HALF_ARM);
    expect(Math.max(...halfArms)).toBeGreaterThan(MAX_UNROLLED_HALF_ARM);
  });

  for (const width of WIDTHS) {
    const design = designHalfband(width, 101);
    const h = halfbandImpulseResponse(design);

    it(`interpolator (K = ${design.armTaps.length / 2}): zero-stuff and filter, gain 2`, () => {
      const count = 297; // odd: the last output has no SIMD partner
      const x = testSignal(count);
      const { arena, output } = arenaFor(HalfbandInterpolator.arenaLengths(design, count), 2 * count);
      const filter = new HalfbandInterpolator(design, count, arena);
      filter.buffer.set(x, filter.historyLength);
      filter.run(count, output, 0);
      const stuffed = new Float64Array(2 * count);
      for (let n = 0; n < count; n++) stuffed[2 * n] = x[n];
      for (let m = 0; m < output.length; m++) expectClose(output[m], 2 * convolve(h, stuffed, m), { atol: 1e-14 });
    });

    for (const extraDelay of [0, 1] as const) {
      it(`decimator (K = ${design.armTaps.length / 2}, padding ${extraDelay}): filter, keep every second`, () => {
        const count = 151;
        const x = testSignal(2 * count);
        const { arena, output } = arenaFor(HalfbandDecimator.arenaLengths(design, count), count);
        const filter = new HalfbandDecimator(design, count, extraDelay, arena);
        filter.buffer.set(x, filter.historyLength);
        filter.run(count, output, 0);
        for (let n = 0; n < count; n++) {
          const m = 2 * n - extraDelay;
          expectClose(output[n], m < 0 ? 0 : convolve(h, x, m), { atol: 1e-14 });
        }
      });
    }
  }
});
