/**
 * Spectral analysis of a synthetic test tone sampled coherently: the window holds a whole number of
 * periods (the fundamental sits exactly on FFT bin k0), so with a rectangular window every harmonic
 * and every alias of one lands on its own bin with no leakage (IEEE Std 1241,
 * coherent sampling). Levels are peak volts: |X[k]| * 2 / N.
 */
import { createRealFft, isPowerOfTwo, type RealFft } from '../dsp/fft.js';
import { amplitudeDb } from '../dsp/decibels.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

/** Levels in dB are null where there is nothing to compare (a silent fundamental or line). */
export interface HarmonicLine {
  order: number;
  hz: number;
  dbc: number | null;
  volts: number;
}

export interface ToneAnalysis {
  fundamentalHz: number;
  fundamentalVolts: number;
  /** Phase of the fundamental (cosine reference), radians. */
  fundamentalPhase: number;
  /** sqrt(sum_{k>=2} V_k^2) / V_1, in percent (IEC 60268-3 THD relative to the fundamental); null for a silent output. */
  thdPercent: number | null;
  /** Everything but DC and the fundamental in 20 Hz-20 kHz over the total in that band (AES17 practice); null for silence. */
  thdnPercent: number | null;
  harmonics: HarmonicLine[];
  /** Shares of the harmonic energy (orders >= 2) in even and odd orders; 0 when there is none. */
  evenShare: number;
  oddShare: number;
  /** Strongest component that is neither DC nor a harmonic, in 20 Hz-20 kHz, dB re fundamental. */
  strongestInharmonicDbc: number | null;
  strongestInharmonicHz: number;
}


/** Round `hz` to the nearest bin of an N-point window at `sampleRate` (at least bin 1). */
export function coherentBin(hz: number, sampleRate: number, windowLength: number): number {
  return Math.max(1, Math.round((hz * windowLength) / sampleRate));
}

export interface ToneAnalyzer {
  readonly windowLength: number;
  analyze(window: Float64Array, fundamentalBin: number, maxHarmonicHz?: number): ToneAnalysis;
}

export function createToneAnalyzer(windowLength: number, sampleRate: number): ToneAnalyzer {
  if (!isPowerOfTwo(windowLength)) throw new RangeError(`tone window must be a power of two, got ${windowLength}`);
  const fft: RealFft = createRealFft(windowLength);
  const spectrum = new Float64Array(2 * fft.binCount);
  const power = new Float64Array(fft.binCount);
  const binHz = sampleRate / windowLength;
  const scale = 2 / windowLength;

  return {
    windowLength,
    analyze(window, k0, maxHarmonicHz = AUDIO_BAND_HIGH_HZ) {
      fft.complexSpectrum(window, spectrum);
      for (let k = 0; k < fft.binCount; k++) {
        power[k] = (spectrum[2 * k] ** 2 + spectrum[2 * k + 1] ** 2) * scale * scale;
      }
      const fundamentalVolts = Math.sqrt(power[k0]);
      const harmonics: HarmonicLine[] = [];
      let harmonicPower = 0;
      let evenPower = 0;
      const harmonicLimitHz = Math.min(maxHarmonicHz, sampleRate / 2);
      for (let order = 2; order * k0 * binHz <= harmonicLimitHz && order * k0 < fft.binCount; order++) {
        const volts = Math.sqrt(power[order * k0]);
        harmonics.push({ order, hz: order * k0 * binHz, dbc: amplitudeDb(volts / fundamentalVolts), volts });
        harmonicPower += volts * volts;
        if (order % 2 === 0) evenPower += volts * volts;
      }
      const lowBin = Math.max(1, Math.ceil(AUDIO_BAND_LOW_HZ / binHz));
      const highBin = Math.min(fft.binCount - 1, Math.floor(AUDIO_BAND_HIGH_HZ / binHz));
      let bandPower = 0;
      let strongest = 0;
      let strongestBin = 0;
      for (let k = lowBin; k <= highBin; k++) {
        bandPower += power[k];
        if (k % k0 !== 0 && power[k] > strongest) {
          strongest = power[k];
          strongestBin = k;
        }
      }
      const residual = Math.max(0, bandPower - power[k0]);
      return {
        fundamentalHz: k0 * binHz,
        fundamentalVolts,
        fundamentalPhase: Math.atan2(spectrum[2 * k0 + 1], spectrum[2 * k0]),
        thdPercent: fundamentalVolts > 0 ? (100 * Math.sqrt(harmonicPower)) / fundamentalVolts : null,
        thdnPercent: bandPower > 0 ? 100 * Math.sqrt(residual / bandPower) : null,
        harmonics,
        evenShare: harmonicPower > 0 ? evenPower / harmonicPower : 0,
        oddShare: harmonicPower > 0 ? 1 - evenPower / harmonicPower : 0,
        strongestInharmonicDbc: amplitudeDb(Math.sqrt(strongest) / fundamentalVolts),
        strongestInharmonicHz: strongestBin * binHz,
      };
    },
  };
}
