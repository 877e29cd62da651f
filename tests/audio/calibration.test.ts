import { describe, expect, test } from 'vitest';
import { calibrate, peakOf, rmsOf } from '../../src/audio/calibration.js';
import { amplitudeDb } from '../../src/dsp/decibels.js';
import { encodeWav } from '../../src/audio/wavWrite.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';

/** Seeded float32 samples in [-0.9, 0.9] on the 24-bit grid, as a 24-bit file would give. */
function takeSamples(frames: number, seed: number): Float32Array {
  const out = new Float32Array(frames);
  let state = seed >>> 0;
  for (let i = 0; i < frames; i++) {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0; // Numerical Recipes LCG, fixed seed
    out[i] = Math.round((state / 2 ** 32 - 0.5) * 1.8 * 2 ** 23) / 2 ** 23;
  }
  return out;
}

describe('calibrate', () => {
  test('full-scale mode: the factor is the given volts at 0 dBFS', () => {
    const take = [takeSamples(5000, 1), takeSamples(5000, 2)];
    for (const fullScaleVolts of [1, 0.5, 2.5, 1.2345, 10 / 3]) {
      const calibration = calibrate(take, { fullScaleVolts });
      expect(calibration.voltsPerFullScale).toBe(fullScaleVolts);
      expectClose(calibration.inputPeakVolts, peakOf(take) * fullScaleVolts, { rtol: 1e-15 });
    }
  });

  test('volts = samples x factor and back is exact for float32 samples (a unity design returns its input)', () => {
    const take = takeSamples(5000, 3);
    const { voltsPerFullScale } = calibrate([take], { fullScaleVolts: 10 / 3 });
    const back = Float32Array.from(take, (x) => (x * voltsPerFullScale) * (1 / voltsPerFullScale));
    expect(back).toEqual(take);
    expect(Buffer.from(encodeWav([back], 48_000, '24')).equals(Buffer.from(encodeWav([take], 48_000, '24')))).toBe(true);
  });

  test('input-peak mode: the loudest sample of any channel becomes the requested volts', () => {
    const left = Float32Array.from([0.1, -0.2, 0.05]);
    const right = Float32Array.from([0.3, -0.4, 0.25]);
    const calibration = calibrate([left, right], { inputPeakVolts: 0.5 });
    expectClose(calibration.voltsPerFullScale, 0.5 / Math.fround(0.4), { rtol: 1e-15 });
    expectClose(calibration.inputPeakVolts, 0.5, { rtol: 1e-15 });
  });

  test('full-scale mode reports the input peak in volts', () => {
    expectClose(calibrate([Float32Array.from([0.25, -0.5])], { fullScaleVolts: 2 }).inputPeakVolts, 1, { rtol: 1e-15 });
  });

  test('a silent take cannot be scaled to an input peak', () => {
    const silent = [new Float32Array(100)];
    expect(() => calibrate(silent, { inputPeakVolts: 0.3 }, 'quiet.wav')).toThrow(UserError);
    expect(() => calibrate(silent, { inputPeakVolts: 0.3 }, 'quiet.wav')).toThrow(/quiet\.wav: take is silent/);
    expect(calibrate(silent, { fullScaleVolts: 1 }).inputPeakVolts).toBe(0);
  });

  test('a float take with samples far beyond full scale (1e30) is refused, naming the file', () => {
    const take = [Float32Array.from([0.1, 1e30, -0.2])];
    expect(() => calibrate(take, { fullScaleVolts: 1 }, 'hot.wav')).toThrow(UserError);
    expect(() => calibrate(take, { fullScaleVolts: 1 }, 'hot.wav')).toThrow(/^hot\.wav: samples reach 1\.00e\+30 x full scale/);
    // A little over full scale (a hot float file) is fine.
    expect(calibrate([Float32Array.from([0.5, 2, -3])], { fullScaleVolts: 1 }).inputPeakVolts).toBeCloseTo(3, 6);
  });

  test('scales must be positive, finite volts', () => {
    const take = [Float32Array.from([0.1])];
    for (const bad of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => calibrate(take, { fullScaleVolts: bad })).toThrow(UserError);
      expect(() => calibrate(take, { inputPeakVolts: bad })).toThrow(UserError);
    }
  });
});

describe('level helpers', () => {
  test('a full-scale sine has RMS 1/sqrt(2), -3.01 dBFS (textbook: RMS of A sin is A/sqrt(2))', () => {
    const sine = new Float64Array(48_000);
    for (let i = 0; i < sine.length; i++) sine[i] = Math.sin((2 * Math.PI * 1000 * i) / 48_000); // whole periods
    expectClose(peakOf([sine]), 1, { atol: 1e-12 });
    expectClose(rmsOf([sine]), Math.SQRT1_2, { rtol: 1e-12 });
    expectClose(amplitudeDb(rmsOf([sine]))!, -3.0103, { atol: 1e-4 });
  });

  test('rms and peak run over all channels together', () => {
    expect(peakOf([Float32Array.from([0.1, -0.2]), Float64Array.from([0.05, -0.7])])).toBeCloseTo(0.7, 7);
    expectClose(rmsOf([Float64Array.from([1, 1]), Float64Array.from([0, 0])]), Math.SQRT1_2, { rtol: 1e-15 });
    expect(rmsOf([])).toBe(0);
  });

  test('amplitudeDb: half scale is -6.02 dB, full scale 0 dB, silence null (no level)', () => {
    expectClose(amplitudeDb(0.5)!, -6.0206, { atol: 1e-4 }); // 20 log10(2) = 6.0206 (definition of the decibel)
    expect(amplitudeDb(1)).toBe(0);
    expect(amplitudeDb(0)).toBeNull();
    expect(amplitudeDb(Infinity)).toBeNull();
  });
});
