import FFT from 'fft.js';
import { describe, expect, it } from 'vitest';
import { createOversampler, type OversampleFactor } from '../../src/dsp/oversampler.js';
import { expectClose } from '../helpers/expectClose.js';
import { fitSine, makeSine } from '../helpers/sineFit.js';

// Requirements (docs/models.md, "Oversampling"): passband flat to 20 kHz within 0.01 dB,
// stopband >= 100 dB for everything that would image or alias into 0-20 kHz, latency compensated.
const FACTORS: OversampleFactor[] = [2, 4, 8, 16];
const BLOCK = 512;

/** Run `input` through up -> down in blocks of `block`; returns the base-rate output. */
function roundTrip(factor: OversampleFactor, input: Float64Array, sampleRate?: number, block = BLOCK): Float64Array {
  const os = createOversampler(factor, BLOCK, sampleRate);
  const fast = new Float64Array(BLOCK * factor);
  const output = new Float64Array(input.length);
  for (let start = 0; start < input.length; start += block) {
    const end = Math.min(input.length, start + block);
    os.upsample(input.subarray(start, end), fast);
    os.downsample(fast, output.subarray(start, end));
  }
  return output;
}

function upsampleAll(factor: OversampleFactor, input: Float64Array, sampleRate?: number): Float64Array {
  const os = createOversampler(factor, BLOCK, sampleRate);
  const out = new Float64Array(input.length * factor);
  for (let start = 0; start < input.length; start += BLOCK) {
    const end = Math.min(input.length, start + BLOCK);
    os.upsample(input.subarray(start, end), out.subarray(start * factor, end * factor));
  }
  return out;
}

function downsampleAll(factor: OversampleFactor, input: Float64Array, sampleRate?: number): Float64Array {
  const os = createOversampler(factor, BLOCK, sampleRate);
  const out = new Float64Array(input.length / factor);
  for (let start = 0; start < out.length; start += BLOCK) {
    const end = Math.min(out.length, start + BLOCK);
    os.downsample(input.subarray(start * factor, end * factor), out.subarray(start, end));
  }
  return out;
}

/** Deterministic white noise in [-1, 1) (32-bit LCG, Numerical Recipes constants). */
function noise(length: number, seed = 12345): Float64Array {
  const out = new Float64Array(length);
  let state = seed >>> 0;
  for (let n = 0; n < length; n++) {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    out[n] = state / 2 ** 31 - 1;
  }
  return out;
}

const toDb = (x: number): number => 20 * Math.log10(x);

/**
 * Sine amplitude in each bin 0..N/2 of `signal[start, start + N)`, N a power of two, by the npm
 * reference FFT (fft.js): 2 |X[k]| / N. With every tone on a bin (coherent sampling) there is no
 * leakage, so a bin holds exactly the tone that sits there.
 */
function binAmplitudes(signal: Float64Array, start: number, size: number): Float64Array {
  const fft = new FFT(size);
  const spectrum = new Float64Array(2 * size);
  fft.realTransform(spectrum, signal.subarray(start, start + size));
  const out = new Float64Array(size / 2 + 1);
  for (let k = 0; k <= size / 2; k++) out[k] = (2 * Math.hypot(spectrum[2 * k], spectrum[2 * k + 1])) / size;
  return out;
}

/** Sum of unit sines, one per bin in `bins` (bin k = k sampleRate / window cycles), `length` samples. */
function binTones(length: number, bins: number[], window: number): Float64Array {
  const out = new Float64Array(length);
  for (const bin of bins) for (let n = 0; n < length; n++) out[n] += Math.sin((2 * Math.PI * bin * n) / window);
  return out;
}

describe('oversampler', () => {
  const rate = 44100;
  const warmUp = 256; // more than any latency: skip the filters' start-up
  const length = warmUp + 4410;

  for (const factor of FACTORS) {
    it(`x${factor}: up -> down is flat within 0.01 dB from 20 Hz to 20 kHz at 44.1 kHz`, () => {
      for (const hz of [20, 1000, 10000, 17000, 19000, 20000]) {
        const out = roundTrip(factor, makeSine(length, hz, rate), rate);
        expectClose(toDb(fitSine(out, hz, rate, warmUp, length).amplitude), 0, { atol: 0.01 });
      }
    });
  }

  const WINDOW = 4096; // base-rate samples analysed (coherent: tones sit on bins of this window)
  for (const [factor, baseRate] of [[2, 44100], [8, 44100], [16, 44100], [8, 48000], [4, 96000]] as const) {
    const binHz = baseRate / WINDOW;
    const topBin = Math.floor(20000 / binHz); // highest bin at or below 20 kHz

    it(`x${factor} at ${baseRate} Hz: after upsampling, everything but the 0-20 kHz tones is below -100 dB`, () => {
      const toneBins = [Math.round(1000 / binHz), Math.round(15000 / binHz), topBin];
      const up = upsampleAll(factor, binTones(warmUp + WINDOW, toneBins, WINDOW), baseRate);
      const amplitudes = binAmplitudes(up, warmUp * factor, WINDOW * factor);
      let worstOther = 0;
      amplitudes.forEach((a, k) => {
        if (toneBins.includes(k)) expectClose(a, 1, { atol: 1e-4 });
        else worstOther = Math.max(worstOther, a);
      });
      // Images of a tone f lie at k fs +- f; every other bin should hold only rounding noise.
      expect(toDb(worstOther)).toBeLessThan(-100);
    });

    it(`x${factor} at ${baseRate} Hz: tones that would alias into 0-20 kHz come out below -100 dB`, () => {
      // For each image band k fs +- (0..20 kHz) of the oversampled rate, unit tones folding onto
      // distinct bins between 0 and 20 kHz (the band edge included).
      const fastBins: number[] = [];
      const foldBins = [topBin, 5, Math.round(7000 / binHz), Math.round(13000 / binHz)];
      for (let k = 1; k < factor; k++) {
        const fold = foldBins[k % foldBins.length] + k; // distinct per k
        fastBins.push(k * WINDOW - Math.min(fold, topBin));
        if (k * WINDOW + fold < (factor * WINDOW) / 2) fastBins.push(k * WINDOW + Math.min(fold + 1, topBin - 1));
      }
      const fast = binTones((warmUp + WINDOW) * factor, fastBins, WINDOW * factor);
      const down = downsampleAll(factor, fast, baseRate);
      const amplitudes = binAmplitudes(down, warmUp, WINDOW);
      let worst = 0;
      for (let k = 0; k <= topBin; k++) worst = Math.max(worst, amplitudes[k]);
      expect(toDb(worst)).toBeLessThan(-100);
    });
  }

  for (const factor of FACTORS) {
    it(`x${factor}: round trip delays by exactly latencyBaseSamples (null below -80 dB)`, () => {
      const os = createOversampler(factor, BLOCK);
      const latency = os.latencyBaseSamples;
      expect(Number.isInteger(latency)).toBe(true);
      // Band-limited test signal: a few tones between 50 Hz and 18 kHz.
      const input = new Float64Array(length);
      [50, 440, 3000, 9000, 18000].forEach((hz, i) => {
        const tone = makeSine(length, hz, rate, 0.2);
        for (let n = i; n < length; n++) input[n] += tone[n - i];
      });
      const out = roundTrip(factor, input);
      let residual = 0;
      let energy = 0;
      for (let n = warmUp; n < length; n++) {
        const d = out[n] - input[n - latency];
        residual += d * d;
        energy += input[n - latency] ** 2;
      }
      expect(10 * Math.log10(residual / energy)).toBeLessThan(-80);
      // Linear phase with a whole-sample centre: the round trip's impulse response is symmetric
      // about latencyBaseSamples.
      const impulse = new Float64Array(4 * latency + 8);
      impulse[0] = 1;
      const h = roundTrip(factor, impulse, undefined, 64);
      let peakIndex = 0;
      for (let n = 1; n < h.length; n++) if (Math.abs(h[n]) > Math.abs(h[peakIndex])) peakIndex = n;
      expect(peakIndex).toBe(latency);
      for (let k = 1; k <= latency; k++) expectClose(h[latency + k], h[latency - k], { atol: 1e-12 });
    });
  }

  it('output does not depend on block boundaries (bit-identical)', () => {
    for (const factor of [2, 8] as const) {
      const input = noise(1500);
      const whole = roundTrip(factor, input, 48000, BLOCK);
      for (const block of [1, 3, 7, 64, 333]) {
        expect(roundTrip(factor, input, 48000, block)).toEqual(whole);
      }
    }
  });

  it('processing in the oversampler\'s own block gives the same bits as a separate buffer', () => {
    for (const factor of [1, 2, 8] as const) {
      const input = noise(1000, 3);
      const viaCopy = roundTrip(factor, input, 48000, 100);
      const os = createOversampler(factor, BLOCK, 48000);
      const inPlace = new Float64Array(input.length);
      for (let start = 0; start < input.length; start += 100) {
        const end = Math.min(input.length, start + 100);
        const fast = os.oversampledBlock(end - start);
        expect(fast.length).toBe((end - start) * factor);
        os.upsample(input.subarray(start, end), fast);
        os.downsample(fast, inPlace.subarray(start, end));
      }
      expect(inPlace).toEqual(viaCopy);
      expect(os.oversampledBlock(BLOCK)).toBe(os.oversampledBlock(BLOCK)); // the full-size view is made once
    }
  });

  it('reset returns to the quiescent state (same output again)', () => {
    const os = createOversampler(4, 256);
    const input = noise(256, 7);
    const fast = new Float64Array(1024);
    const first = new Float64Array(256);
    const second = new Float64Array(256);
    os.upsample(input, fast);
    os.downsample(fast, first);
    os.reset();
    os.upsample(input, fast);
    os.downsample(fast, second);
    expect(second).toEqual(first);
    expect(first.some((x) => x !== 0)).toBe(true);
  });

  it('factor 1 passes through with no latency', () => {
    const os = createOversampler(1, 16);
    expect(os.latencyBaseSamples).toBe(0);
    const input = noise(16);
    const fast = new Float64Array(16);
    const out = new Float64Array(16);
    os.upsample(input, fast);
    os.downsample(fast, out);
    expect(out).toEqual(input);
  });

  it('rejects a block larger than the maximum and a short oversampled buffer', () => {
    const os = createOversampler(8, 64);
    expect(() => os.upsample(new Float64Array(65), new Float64Array(65 * 8))).toThrow(/exceeds the maximum 64/);
    expect(() => os.upsample(new Float64Array(64), new Float64Array(64))).toThrow(/needs 512/);
    expect(() => createOversampler(3 as OversampleFactor, 64)).toThrow(RangeError);
  });
});
