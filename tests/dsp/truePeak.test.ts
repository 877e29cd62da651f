import { describe, expect, it } from 'vitest';
import { truePeakDb, truePeakLinear } from '../../src/dsp/truePeak.js';
import { expectClose } from '../helpers/expectClose.js';
import { sumOfSines } from './testSignals.js';

/**
 * Raised-cosine fade in and out over `fadeSamples`, so that the abrupt start and end of the array
 * (which a band-limited reconstruction legitimately overshoots) do not mask the steady-state reading.
 */
function faded(x: Float64Array, fadeSamples: number): Float64Array {
  for (let i = 0; i < fadeSamples; i++) {
    const g = 0.5 - 0.5 * Math.cos((Math.PI * i) / fadeSamples);
    x[i] *= g;
    x[x.length - 1 - i] *= g;
  }
  return x;
}

describe('true peak (ITU-R BS.1770-4 Annex 2, 4x oversampling)', () => {
  it('finds the inter-sample peak of a sine at fs/4 sampled 45 degrees off its crest', () => {
    // Samples sit at +-A/sqrt(2) (sample peak -3.01 dB re A); the continuous sine reaches A, at
    // t = 0.5 sample, which lies on the 4x grid (sampling theorem: the band-limited signal is the sine).
    const x = faded(sumOfSines(4800, 48000, [{ hz: 12000, amplitude: 0.5, phase: Math.PI / 4 }]), 480);
    let samplePeak = 0;
    for (const v of x) samplePeak = Math.max(samplePeak, Math.abs(v));
    expectClose(samplePeak, 0.5 / Math.SQRT2, { rtol: 1e-9 });
    expectClose(truePeakLinear(x, 48000), 0.5, { rtol: 0.005 }); // within 0.05 dB
  });

  it('reads a 997 Hz sine within 0.05 dB of its amplitude and never below the sample peak', () => {
    const x = faded(sumOfSines(9600, 48000, [{ hz: 997, amplitude: 0.25, phase: 0.3 }]), 480);
    expectClose(20 * Math.log10(truePeakLinear(x, 48000)), 20 * Math.log10(0.25), { atol: 0.05 });
    let samplePeak = 0;
    for (const v of x) samplePeak = Math.max(samplePeak, Math.abs(v));
    expect(truePeakLinear(x, 48000)).toBeGreaterThanOrEqual(samplePeak * (1 - 1e-9));
  });

  it('under-reads a sine at 0.45 fs by at most 0.7 dB (BS.1770-4 Annex 2: 4x oversampling under-reads by at most about 0.7 dB; from memory)', () => {
    for (const phase of [0, 0.2, 0.4, 0.6, 0.8]) {
      const x = faded(sumOfSines(4800, 48000, [{ hz: 21600, amplitude: 1, phase }]), 480);
      expect(20 * Math.log10(truePeakLinear(x, 48000))).toBeGreaterThan(-0.7);
    }
  });

  it('is -Infinity dB for silence', () => {
    expect(truePeakDb([new Float32Array(100)], 48000)).toBe(-Infinity);
  });
});
