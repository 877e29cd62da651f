import { describe, expect, it } from 'vitest';
import { measureHarmonics } from '../../src/analysis/harmonics.js';
import { expectClose } from '../helpers/expectClose.js';
import { gaussianNoise, sumOfSines } from '../dsp/testSignals.js';

const SAMPLE_RATE = 48000;

/**
 * Band-limited square wave of peak 1: Fourier series (4 / pi) sum_{k odd} sin(k w t) / k, every odd
 * harmonic with k <= maxOrder. sin(k theta) by the Chebyshev recurrence s_{k+2} = 2 cos(2 theta) s_k - s_{k-2}.
 */
function bandLimitedSquare(length: number, hz: number, sampleRate: number, maxOrder: number): Float64Array {
  const out = new Float64Array(length);
  for (let n = 0; n < length; n++) {
    const theta = (2 * Math.PI * hz * n) / sampleRate;
    const twoCos2 = 2 * Math.cos(2 * theta);
    let previous = -Math.sin(theta); // sin(-theta)
    let current = Math.sin(theta);
    let sum = 0;
    for (let k = 1; k <= maxOrder; k += 2) {
      sum += current / k;
      const next = twoCos2 * current - previous;
      previous = current;
      current = next;
    }
    out[n] = (4 / Math.PI) * sum;
  }
  return out;
}

describe('measureHarmonics', () => {
  it('reads THD = sqrt(pi^2/8 - 1) = 48.34 % for a square wave (Fourier series: odd harmonics 1/k)', () => {
    // 96 kHz and a 20.5 Hz fundamental (bin 14 of 65536) leave room for 2340 harmonics below Nyquist.
    const sampleRate = 96000;
    const length = 1 << 16;
    const fundamentalHz = (14 * sampleRate) / length;
    const maxOrder = 2339;
    const report = measureHarmonics(bandLimitedSquare(length, fundamentalHz, sampleRate, maxOrder), sampleRate, {
      maxHz: sampleRate / 2,
    });
    expect(report.harmonics.at(-1)!.order).toBeGreaterThanOrEqual(maxOrder);
    // Truncating the series at k = 2339 drops sum_{k odd > 2339} 1/k^2 ~ 1/(2 * 2340) from THD^2,
    // i.e. 0.02 percentage points; the tolerance allows for it.
    expectClose(report.thdPercent, 100 * Math.sqrt((Math.PI * Math.PI) / 8 - 1), { atol: 0.05 });
    expectClose(report.fundamentalVolts, 4 / Math.PI, { rtol: 1e-4 });
    // A half-wave symmetric waveform has no even harmonics (Fourier series symmetry).
    expect(report.evenShare).toBeLessThan(1e-9);
    expectClose(report.oddShare, 1, { atol: 1e-9 });
    expectClose(report.harmonics[1].dbc, 20 * Math.log10(1 / 3), { atol: 0.01 });
  });

  it('reads back harmonics at known levels within 0.1 dB, with a fundamental between bins', () => {
    const fundamentalHz = 1000.37;
    const amplitude = 0.8;
    const levelsDbc = new Map([
      [2, -20],
      [3, -30],
      [5, -60],
      [7, -80],
    ]);
    const components = [{ hz: fundamentalHz, amplitude, phase: 0.1 }];
    for (const [order, dbc] of levelsDbc) {
      components.push({ hz: order * fundamentalHz, amplitude: amplitude * 10 ** (dbc / 20), phase: order * 0.7 });
    }
    const signal = sumOfSines(72000, SAMPLE_RATE, components);
    const report = measureHarmonics(signal, SAMPLE_RATE);
    expectClose(report.fundamentalHz, fundamentalHz, { atol: 0.01 });
    expectClose(20 * Math.log10(report.fundamentalVolts / amplitude), 0, { atol: 0.01 });
    for (const [order, dbc] of levelsDbc) {
      const row = report.harmonics.find((h) => h.order === order);
      expect(row, `order ${order}`).toBeDefined();
      expectClose(row!.dbc, dbc, { atol: 0.1 });
      expectClose(row!.hz, order * fundamentalHz, { atol: 0.1 });
      expectClose(20 * Math.log10(row!.volts / amplitude), dbc, { atol: 0.1 });
    }
    // Orders up to 20 kHz only.
    expect(report.harmonics.at(-1)!.order).toBe(19);
    const expectedThd = 100 * Math.sqrt([...levelsDbc.values()].reduce((s, db) => s + 10 ** (db / 10), 0));
    expectClose(report.thdPercent, expectedThd, { rtol: 0.01 });
    expectClose(report.evenShare, 10 ** (-20 / 10) / (expectedThd / 100) ** 2, { rtol: 0.01 });
  });

  it('follows a given fundamental even when a harmonic is stronger', () => {
    const signal = sumOfSines(32768, SAMPLE_RATE, [
      { hz: 220, amplitude: 0.1 },
      { hz: 440, amplitude: 0.5 },
    ]);
    expectClose(measureHarmonics(signal, SAMPLE_RATE).fundamentalHz, 440, { atol: 0.05 });
    const hinted = measureHarmonics(signal, SAMPLE_RATE, { fundamentalHz: 221 });
    expectClose(hinted.fundamentalHz, 220, { atol: 0.05 });
    expectClose(hinted.harmonics[0].dbc, 20 * Math.log10(5), { atol: 0.1 });
  });

  it('reads THD+N of a sine plus white noise as the in-band noise over the total (AES17 practice)', () => {
    const sigma = 0.01;
    const signal = sumOfSines(1 << 17, SAMPLE_RATE, [{ hz: 997, amplitude: 1 }]);
    const noise = gaussianNoise(signal.length, sigma, 5);
    for (let i = 0; i < signal.length; i++) signal[i] += noise[i];
    // White noise spreads sigma^2 evenly over 0..fs/2; the 20 Hz-20 kHz band holds (20000-20)/24000 of it.
    const noiseInBand = sigma * sigma * ((20000 - 20) / 24000);
    const expected = 100 * Math.sqrt(noiseInBand / (0.5 + noiseInBand));
    const report = measureHarmonics(signal, SAMPLE_RATE);
    expectClose(report.thdnPercent, expected, { rtol: 0.02 });
    expect(report.thdPercent).toBeLessThan(report.thdnPercent);
  });

  it('reads a pure sine as THD and THD+N near zero (floor set by the -92 dB window side lobes, Harris 1978)', () => {
    const report = measureHarmonics(sumOfSines(48000, SAMPLE_RATE, [{ hz: 1234.5, amplitude: 0.3 }]), SAMPLE_RATE);
    expect(report.thdPercent).toBeLessThan(1e-4); // -120 dB
    expect(report.thdnPercent).toBeLessThan(5e-3); // -86 dB
  });
});

describe('measureHarmonics input limits', () => {
  it('names the usable range when a given fundamental is below it', () => {
    const signal = sumOfSines(48000, SAMPLE_RATE, [{ hz: 1000, amplitude: 0.5 }]);
    expect(() => measureHarmonics(signal, SAMPLE_RATE, { fundamentalHz: 5 })).toThrow(/between 20\.\d Hz and \d+ Hz/);
  });

  it('refuses a signal too short to analyse', () => {
    expect(() => measureHarmonics(new Float64Array(500), SAMPLE_RATE)).toThrow(RangeError);
  });
});
