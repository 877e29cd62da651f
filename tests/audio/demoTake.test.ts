import FFT from 'fft.js';
import { describe, expect, test } from 'vitest';
import { peakOf } from '../../src/audio/calibration.js';
import { midiNoteToHz, synthesizeDemoTake } from '../../src/audio/demoTake.js';
import { encodeWav } from '../../src/audio/wavWrite.js';
import { expectClose } from '../helpers/expectClose.js';

const take = synthesizeDemoTake();

interface FftPlan {
  createComplexArray(): number[];
  realTransform(out: number[], input: number[]): void;
}

/** Hann-windowed power spectrum of `samples[start .. start + size)` by the npm reference FFT (fft.js). */
function powerSpectrum(samples: Float64Array, start: number, size: number): Float64Array {
  const fft = new FFT(size) as unknown as FftPlan;
  const frame = new Array<number>(size);
  for (let i = 0; i < size; i++) frame[i] = samples[start + i] * (0.5 - 0.5 * Math.cos((2 * Math.PI * i) / size));
  const out = fft.createComplexArray();
  fft.realTransform(out, frame);
  const power = new Float64Array(size / 2 + 1);
  for (let k = 0; k <= size / 2; k++) power[k] = out[2 * k] ** 2 + out[2 * k + 1] ** 2;
  return power;
}

/** Welch average over half-overlapping frames. */
function averageSpectrum(samples: Float64Array, size: number): Float64Array {
  const sum = new Float64Array(size / 2 + 1);
  for (let start = 0; start + size <= samples.length; start += size / 2) {
    const power = powerSpectrum(samples, start, size);
    for (let k = 0; k < sum.length; k++) sum[k] += power[k];
  }
  return sum;
}

function bandPower(power: Float64Array, binHz: number, lowHz: number, highHz: number): number {
  let total = 0;
  for (let k = Math.ceil(lowHz / binHz); k < Math.min(power.length, highHz / binHz); k++) total += power[k];
  return total;
}

describe('demo take', () => {
  test('defaults: 48 kHz, 10 s, finite volts', () => {
    expect(take.sampleRate).toBe(48_000);
    expect(take.volts.length).toBe(480_000);
    expect(take.volts.every(Number.isFinite)).toBe(true);
    expect(take.description).toMatch(/plucked-string/);
  });

  test('peak in the range of a passive pickup (0.2-0.6 V; 0.1-1 V peak is common practice)', () => {
    const peakVolts = peakOf([take.volts]);
    expect(peakVolts).toBeGreaterThanOrEqual(0.2);
    expect(peakVolts).toBeLessThanOrEqual(0.6);
  });

  test('same seed gives identical bytes, another seed a different take', () => {
    const again = synthesizeDemoTake();
    expect(Buffer.from(again.volts.buffer).equals(Buffer.from(take.volts.buffer))).toBe(true);
    expect(Buffer.from(encodeWav([again.volts], 48_000, '24')).equals(Buffer.from(encodeWav([take.volts], 48_000, '24')))).toBe(true);
    const other = synthesizeDemoTake({ seed: 7 });
    expect(Buffer.from(other.volts.buffer).equals(Buffer.from(take.volts.buffer))).toBe(false);
  });

  test('other rates and lengths', () => {
    const short = synthesizeDemoTake({ sampleRate: 96_000, seconds: 2, seed: 3 });
    expect(short.volts.length).toBe(192_000);
    expect(short.volts.every(Number.isFinite)).toBe(true);
    expect(() => synthesizeDemoTake({ seconds: 0 })).toThrow(RangeError);
  });

  test('spectrum like a guitar DI: energy in the playing range, rolled off above the pickup resonance', () => {
    const size = 8192;
    const binHz = take.sampleRate / size;
    const power = averageSpectrum(take.volts, size);
    const total = bandPower(power, binHz, 0, take.sampleRate / 2);
    // Guitar fundamentals span about 82 Hz (E2) to ~1.2 kHz, and a passive pickup's resonance
    // (about 3-5 kHz) is the last lift before a second-order roll-off (common practice).
    expect(bandPower(power, binHz, 70, 5_000) / total).toBeGreaterThan(0.9);
    expect(bandPower(power, binHz, 10_000, 24_000) / total).toBeLessThan(1e-3);
    const densityNearResonance = bandPower(power, binHz, 3_000, 5_000) / 2_000;
    const densityAbove = bandPower(power, binHz, 8_000, 12_000) / 4_000;
    expect(10 * Math.log10(densityNearResonance / densityAbove)).toBeGreaterThan(15);
    // Below the lowest note there is next to nothing (the pickup comb and velocity sensing null DC).
    expect(bandPower(power, binHz, 0, 60) / total).toBeLessThan(1e-3);
  });

  test('the first note is in tune: D3 = 146.83 Hz (12-TET, A4 = 440 Hz, ISO 16)', () => {
    expectClose(midiNoteToHz(50), 146.832, { atol: 1e-3 }); // standard pitch table, from memory
    const size = 16_384;
    const start = Math.round(0.2 * take.sampleRate); // the note sounds from ~0.15 s to ~0.78 s
    const power = powerSpectrum(take.volts, start, size);
    const binHz = take.sampleRate / size;
    // Peak bin near the fundamental, refined by parabolic interpolation of the log power.
    let best = Math.floor(120 / binHz);
    for (let k = best; k <= 175 / binHz; k++) if (power[k] > power[best]) best = k;
    const [a, b, c] = [power[best - 1], power[best], power[best + 1]].map(Math.log);
    const peakHz = (best + (0.5 * (a - c)) / (a - 2 * b + c)) * binHz;
    expectClose(peakHz, 146.832, { rtol: 0.003 }); // within 5 cents
  });
});
