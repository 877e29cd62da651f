import { describe, expect, it } from 'vitest';
import { designHalfband, halfbandAmplitude, halfbandImpulseResponse } from '../../src/dsp/halfband.js';
import { expectClose } from '../helpers/expectClose.js';

/** |H(f)| by direct evaluation of sum h[n] e^{-j 2 pi f n} (independent of halfbandAmplitude). */
function magnitude(h: Float64Array, f: number): number {
  let re = 0;
  let im = 0;
  for (let n = 0; n < h.length; n++) {
    re += h[n] * Math.cos(2 * Math.PI * f * n);
    im -= h[n] * Math.sin(2 * Math.PI * f * n);
  }
  return Math.hypot(re, im);
}

describe('half-band design', () => {
  for (const width of [0.0465, 0.1, 0.273, 0.4]) {
    it(`transition ${width}: half-band structure and >= 100 dB stopband`, () => {
      const design = designHalfband(width, 101);
      const h = halfbandImpulseResponse(design);
      const m = design.delaySamples;
      expect(m % 2).toBe(1);
      // Half-band definition (Vaidyanathan, Multirate Systems and Filter Banks, sec. 4.6.1):
      // h[M] = 1/2, h[M + 2i] = 0 for i != 0, linear phase h[M + k] = h[M - k].
      expect(h[m]).toBe(0.5);
      for (let k = 1; k <= m; k++) {
        if (k % 2 === 0) expect(h[m + k]).toBe(0);
        expect(h[m + k]).toBe(h[m - k]);
      }
      // Complementarity A(f) + A(1/2 - f) = 1 that follows from it.
      for (const f of [0.01, 0.1, 0.2]) {
        expectClose(halfbandAmplitude(design, f) + halfbandAmplitude(design, 0.5 - f), 1, { atol: 1e-12 });
      }
      // Stopband: from a quarter plus half the transition width up to half the sample rate.
      let peak = 0;
      const edge = 0.25 + width / 2;
      for (let i = 0; i <= 2000; i++) peak = Math.max(peak, magnitude(h, edge + ((0.5 - edge) * i) / 2000));
      expect(20 * Math.log10(peak)).toBeLessThan(-100);
      // DC gain exactly 1 and a zero at half the sample rate (odd taps scaled to sum to 1/2).
      expectClose(magnitude(h, 0), 1, { atol: 1e-14 });
      expectClose(magnitude(h, 0.5), 0, { atol: 1e-14 });
    });
  }

  it('rejects a transition width outside (0, 0.5)', () => {
    expect(() => designHalfband(0, 100)).toThrow(RangeError);
    expect(() => designHalfband(0.5, 100)).toThrow(RangeError);
  });
});
