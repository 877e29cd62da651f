import { describe, it } from 'vitest';
import { welch } from '../../src/dsp/welch.js';
import { expectClose } from '../helpers/expectClose.js';
import { gaussianNoise, sumOfSines } from './testSignals.js';

describe('welch (Welch 1967, averaged periodogram)', () => {
  it('density integrates to the variance of white noise (Parseval)', () => {
    const sigma = 0.3;
    const x = gaussianNoise(1 << 16, sigma, 11);
    const { values, binHz, segmentCount } = welch(x, 48000, { segmentLength: 1024 });
    expectClose(segmentCount, (65536 - 1024) / 512 + 1, { atol: 0 });
    let integral = 0;
    for (const v of values) integral += v * binHz;
    expectClose(integral, sigma * sigma, { rtol: 0.02 });
    // White noise density is flat at sigma^2 / (fs / 2) one-sided; check a mid band average.
    let mid = 0;
    for (let k = 100; k < 400; k++) mid += values[k];
    expectClose(mid / 300, (sigma * sigma) / 24000, { rtol: 0.03 });
  });

  it("'spectrum' scaling reads A^2 / 2 for a bin-centred sine of peak amplitude A", () => {
    const sampleRate = 48000;
    const segmentLength = 4096;
    const hz = (100 * sampleRate) / segmentLength;
    const x = sumOfSines(1 << 15, sampleRate, [{ hz, amplitude: 0.5 }]);
    const { values } = welch(x, sampleRate, { segmentLength, scaling: 'spectrum' });
    expectClose(values[100], 0.125, { rtol: 1e-6 });
  });
});
