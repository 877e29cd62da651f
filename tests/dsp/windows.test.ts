import { describe, expect, it } from 'vitest';
import { createRealFft } from '../../src/dsp/fft.js';
import {
  BLACKMAN_HARRIS_4,
  blackmanHarrisWindow,
  coherentGain,
  equivalentNoiseBandwidthBins,
  hannWindow,
} from '../../src/dsp/windows.js';
import { expectClose } from '../helpers/expectClose.js';

/** Window spectrum in dB re its peak, zero-padded `pad` times for a fine frequency grid. */
function windowSpectrumDb(window: Float64Array, pad: number): Float64Array {
  const fft = createRealFft(window.length * pad);
  const input = new Float64Array(window.length * pad);
  input.set(window);
  const mag = new Float64Array(fft.binCount);
  fft.magnitudeSpectrum(input, mag);
  return mag.map((m) => 20 * Math.log10(m / mag[0]));
}

describe('Blackman-Harris window (Harris 1978, Proc. IEEE 66(1), Table 1)', () => {
  it('uses the published 4-term coefficients, which sum to 1', () => {
    // Harris 1978: 4-term (-92 dB) a0..a3 = 0.35875, 0.48829, 0.14128, 0.01168.
    expect([...BLACKMAN_HARRIS_4]).toEqual([0.35875, 0.48829, 0.14128, 0.01168]);
    const w = blackmanHarrisWindow(64);
    expectClose(w[32], 1, { atol: 1e-12 }); // a0 + a1 + a2 + a3 at the centre
    expectClose(w[0], 0.35875 - 0.48829 + 0.14128 - 0.01168, { atol: 1e-15 });
  });

  it('has its highest side lobe near -92 dB (Harris 1978: -92 dB)', () => {
    const length = 256;
    const pad = 32;
    const db = windowSpectrumDb(blackmanHarrisWindow(length), pad);
    // Main lobe half-width is 4 bins for a 4-term cosine window; skip it (plus a margin).
    let highest = -Infinity;
    for (let k = 4 * pad + pad / 2; k < db.length; k++) highest = Math.max(highest, db[k]);
    expectClose(highest, -92, { atol: 1 });
  });

  it('has ENBW about 2.00 bins and coherent gain 0.36 (Harris 1978, Table 1)', () => {
    const w = blackmanHarrisWindow(4096);
    expectClose(equivalentNoiseBandwidthBins(w), 2.0, { atol: 0.01 });
    expectClose(coherentGain(w), 0.35875, { atol: 1e-12 }); // equals a0 for a periodic cosine-sum window
  });
});

describe('Hann window (Harris 1978, Table 1)', () => {
  it('has ENBW 1.50 bins, coherent gain 0.50 and first side lobe -31.5 dB', () => {
    const w = hannWindow(1024);
    expectClose(equivalentNoiseBandwidthBins(w), 1.5, { atol: 1e-9 });
    expectClose(coherentGain(w), 0.5, { atol: 1e-12 });
    const pad = 32;
    const db = windowSpectrumDb(hannWindow(256), pad);
    let highest = -Infinity;
    for (let k = 2 * pad + pad / 4; k < db.length; k++) highest = Math.max(highest, db[k]);
    expectClose(highest, -31.5, { atol: 0.2 });
  });
});
