import { describe, it } from 'vitest';
import { createRealFft } from '../../src/dsp/fft.js';
import { expectClose } from '../helpers/expectClose.js';
import { uniformNoise as noise } from './testSignals.js';

describe('createRealFft', () => {
  it('matches a direct DFT X[k] = sum x[n] e^{-j2pi kn/N} (definition of the DFT)', () => {
    for (const size of [8, 32, 128]) {
      const x = noise(size, 7 + size);
      const fft = createRealFft(size);
      const out = new Float64Array(size + 2);
      fft.complexSpectrum(x, out);
      for (let k = 0; k <= size / 2; k++) {
        let re = 0;
        let im = 0;
        for (let n = 0; n < size; n++) {
          re += x[n] * Math.cos((2 * Math.PI * k * n) / size);
          im -= x[n] * Math.sin((2 * Math.PI * k * n) / size);
        }
        expectClose(out[2 * k], re, { atol: 1e-10 });
        expectClose(out[2 * k + 1], im, { atol: 1e-10 });
      }
    }
  });

  it("satisfies Parseval's theorem: sum |x|^2 = (1/N) sum |X|^2 over all N bins", () => {
    const size = 1024;
    const x = noise(size, 42);
    const fft = createRealFft(size);
    const power = new Float64Array(fft.binCount);
    fft.powerSpectrum(x, power);
    let timeEnergy = 0;
    for (const v of x) timeEnergy += v * v;
    // Bins 1..N/2-1 stand for themselves and their conjugate mirror.
    let freqEnergy = power[0] + power[size / 2];
    for (let k = 1; k < size / 2; k++) freqEnergy += 2 * power[k];
    expectClose(freqEnergy / size, timeEnergy, { rtol: 1e-12 });
  });

  it('magnitude of a coherent cosine of amplitude A is A N / 2 at its bin', () => {
    const size = 256;
    const x = new Float64Array(size).map((_, n) => 0.7 * Math.cos((2 * Math.PI * 10 * n) / size));
    const fft = createRealFft(size);
    const mag = new Float64Array(fft.binCount);
    fft.magnitudeSpectrum(x, mag);
    expectClose(mag[10], (0.7 * size) / 2, { rtol: 1e-12 });
    expectClose(mag[11], 0, { atol: 1e-9 });
  });
});
