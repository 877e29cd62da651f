/**
 * Analysis of any WAV take: sample peak, RMS, true peak, integrated loudness, crest factor, the
 * long-term average spectrum and, where a steady tone is present (or its frequency is given), the
 * fundamental, THD, THD+N and harmonic table.
 *
 * Levels are over all channels together (peak: the largest sample of any channel; RMS: the mean
 * square of every sample). Spectrum and tone analysis use the channel average (mono fold-down).
 * Values that do not exist (levels of digital silence, tone figures without a tone) are null, so the
 * JSON never carries NaN or infinities.
 */
import type { DecodedWav } from '../audio/wavRead.js';
import { UserError } from '../errors.js';
import { floorPowerOfTwo } from '../dsp/fft.js';
import { integratedLoudness } from '../dsp/loudness.js';
import { truePeakDb } from '../dsp/truePeak.js';
import { welch, type WelchResult } from '../dsp/welch.js';
import { measureHarmonics, type HarmonicReport } from './harmonics.js';
import { monoFoldDown } from '../audio/mixdown.js';
import { peakOf, rmsOf } from '../audio/calibration.js';
import { amplitudeDb } from '../dsp/decibels.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

export interface SpectrumPoint {
  hz: number;
  /** Power in the bin, dB re a full-scale sine (a 0 dBFS sine reads 0 dB at its bin). */
  db: number;
}

/** 'not-found': a fundamental was given but no tone stands out there. */
export type ToneSource = 'given' | 'detected' | 'none' | 'not-found';

/**
 * A given fundamental counts as a tone only when it carries more power than everything else in the
 * audio band together. THD+N is the residual over the total (AES17 practice), so that is THD+N below
 * 1/sqrt(2) = 70.7 %; otherwise its THD would describe noise or another note.
 */
const MAX_TONE_THDN_PERCENT = 100 / Math.SQRT2;

export interface AnalyzeReport {
  file: string;
  sampleRate: number;
  channels: number;
  durationSeconds: number;
  peakDbfs: number | null;
  rmsDbfs: number | null;
  truePeakDbfs: number | null;
  lufs: number | null;
  crestDb: number | null;
  toneSource: ToneSource;
  /** Why no tone figures are given, when a fundamental was asked for and not found; else null. */
  toneNote: string | null;
  fundamentalHz: number | null;
  thdPercent: number | null;
  thdnPercent: number | null;
  harmonics: { order: number; hz: number; dbc: number }[];
  /** Welch long-term average spectrum, about 200 log-spaced points over 20 Hz-20 kHz (peak per band). */
  spectrum: SpectrumPoint[];
}

export interface AnalyzeOptions {
  /** Measure the tone at this frequency instead of detecting one. */
  fundamentalHz?: number;
}

/** Welch segment at 48 kHz (5.9 Hz bins), scaled with the sample rate. */
const SPECTRUM_SEGMENT_SECONDS = 8192 / 48000;
const MIN_SPECTRUM_SEGMENT = 256;
const SPECTRUM_POINTS = 200;
const SPECTRUM_FLOOR_DB = -240;
/** Tone detection: segments of about a third of a second, at most this many, spread over the take. */
const TONE_SEGMENT_SECONDS = 1 / 3;
const MAX_TONE_SEGMENTS = 8;
const MIN_TONE_SEGMENT = 2048;
/** A steady tone holds at least this share of the in-band power in every segment... */
const TONE_MIN_POWER_SHARE = 0.5;
/** ...and its frequency stays within this fraction of the median across segments (about 17 cents). */
const TONE_FREQUENCY_TOLERANCE = 0.01;

function finiteOrNull(value: number): number | null {
  return Number.isFinite(value) ? value : null;
}

/**
 * The long-term average spectrum behind `logSpacedSpectrum` (and compare's spectral centroid):
 * Welch, 'spectrum' scaling, segments of SPECTRUM_SEGMENT_SECONDS; null when the signal is too short.
 */
export function longTermSpectrum(signal: Float64Array, sampleRate: number): WelchResult | null {
  const wanted = floorPowerOfTwo(Math.max(1, SPECTRUM_SEGMENT_SECONDS * sampleRate));
  const segmentLength = Math.min(wanted, floorPowerOfTwo(Math.max(1, signal.length)));
  if (segmentLength < MIN_SPECTRUM_SEGMENT) return null;
  return welch(signal, sampleRate, { segmentLength, scaling: 'spectrum' });
}

/** Welch spectrum reduced to log-spaced bands (the strongest bin of each band, so tones stay visible). */
export function logSpacedSpectrum(signal: Float64Array, sampleRate: number, points = SPECTRUM_POINTS): SpectrumPoint[] {
  const spectrum = longTermSpectrum(signal, sampleRate);
  return spectrum === null ? [] : logSpacedBands(spectrum, sampleRate, points);
}

/** `logSpacedSpectrum` from an already computed long-term spectrum. */
export function logSpacedBands({ values, binHz }: WelchResult, sampleRate: number, points = SPECTRUM_POINTS): SpectrumPoint[] {
  const highHz = Math.min(AUDIO_BAND_HIGH_HZ, sampleRate / 2);
  const ratio = Math.pow(highHz / AUDIO_BAND_LOW_HZ, 1 / points);
  const out: SpectrumPoint[] = [];
  let lastBin = -1;
  for (let band = 0; band < points; band++) {
    const lowHz = AUDIO_BAND_LOW_HZ * ratio ** band;
    const from = Math.max(lastBin + 1, Math.ceil(lowHz / binHz));
    const to = Math.min(values.length - 1, Math.floor((lowHz * ratio) / binHz));
    // A band narrower than a bin takes the nearest bin not yet used.
    const last = Math.max(from, to);
    if (from >= values.length) break;
    let best = from;
    for (let k = from + 1; k <= last; k++) if (values[k] > values[best]) best = k;
    lastBin = last;
    const power = 2 * values[best]; // re a full-scale sine, whose bin holds 1/2
    out.push({ hz: best * binHz, db: power > 0 ? Math.max(SPECTRUM_FLOOR_DB, 10 * Math.log10(power)) : SPECTRUM_FLOOR_DB });
  }
  return out;
}

/** Median fundamental of a tone that dominates every segment and holds its frequency; else null. */
export function detectSteadyTone(signal: Float64Array, sampleRate: number): number | null {
  let segmentLength = floorPowerOfTwo(Math.max(1, TONE_SEGMENT_SECONDS * sampleRate));
  if (signal.length < 2 * segmentLength) segmentLength = floorPowerOfTwo(Math.max(1, signal.length / 2));
  if (segmentLength < MIN_TONE_SEGMENT) return null;
  const available = Math.floor(signal.length / segmentLength);
  const count = Math.min(MAX_TONE_SEGMENTS, available);
  const stride = Math.floor((signal.length - segmentLength) / Math.max(1, count - 1));
  const frequencies: number[] = [];
  for (let s = 0; s < count; s++) {
    const segment = signal.subarray(s * stride, s * stride + segmentLength);
    let report: HarmonicReport;
    try {
      report = measureHarmonics(segment, sampleRate);
    } catch (error) {
      if (error instanceof RangeError) return null; // silent or unresolvable segment: no steady tone
      throw error;
    }
    const residualShare = (report.thdnPercent / 100) ** 2;
    if (1 - residualShare < TONE_MIN_POWER_SHARE) return null;
    frequencies.push(report.fundamentalHz);
  }
  frequencies.sort((a, b) => a - b);
  const median = frequencies[Math.floor(frequencies.length / 2)];
  const steady = frequencies.every((hz) => Math.abs(hz - median) <= TONE_FREQUENCY_TOLERANCE * median);
  return steady ? median : null;
}

export function analyzeTake(wav: DecodedWav, options: AnalyzeOptions = {}): AnalyzeReport {
  const { channels, sampleRate, frames } = wav;
  const peak = peakOf(channels);
  const peakDbfs = amplitudeDb(peak);
  const rmsDbfs = amplitudeDb(rmsOf(channels));
  const mono = monoFoldDown(channels);

  let toneSource: ToneSource = 'none';
  let toneNote: string | null = null;
  let tone: HarmonicReport | null = null;
  if (options.fundamentalHz !== undefined) {
    const nyquistHz = sampleRate / 2;
    if (!(options.fundamentalHz > 0 && options.fundamentalHz < nyquistHz)) {
      throw new UserError(
        `${wav.path}: fundamental ${options.fundamentalHz} Hz is outside 0-${nyquistHz} Hz (half the sample rate)`,
      );
    }
    try {
      tone = measureHarmonics(mono, sampleRate, { fundamentalHz: options.fundamentalHz });
    } catch (error) {
      if (error instanceof RangeError) throw new UserError(`${wav.path}: cannot measure a tone at ${options.fundamentalHz} Hz: ${error.message}`);
      throw error;
    }
    toneSource = 'given';
    if (tone.thdnPercent > MAX_TONE_THDN_PERCENT) {
      toneNote = `No tone near ${options.fundamentalHz} Hz: the strongest component there (${tone.fundamentalHz.toFixed(1)} Hz) is weaker than the rest of the signal (THD+N ${tone.thdnPercent.toFixed(0)} %)`;
      tone = null;
      toneSource = 'not-found';
    }
  } else {
    const detectedHz = detectSteadyTone(mono, sampleRate);
    if (detectedHz !== null) {
      tone = measureHarmonics(mono, sampleRate, { fundamentalHz: detectedHz });
      toneSource = 'detected';
    }
  }

  return {
    file: wav.path,
    sampleRate,
    channels: channels.length,
    durationSeconds: frames / sampleRate,
    peakDbfs,
    rmsDbfs,
    truePeakDbfs: finiteOrNull(truePeakDb(channels, sampleRate)),
    lufs: finiteOrNull(integratedLoudness(channels, sampleRate)),
    crestDb: peakDbfs !== null && rmsDbfs !== null ? peakDbfs - rmsDbfs : null,
    toneSource,
    toneNote,
    fundamentalHz: tone?.fundamentalHz ?? null,
    thdPercent: tone?.thdPercent ?? null,
    thdnPercent: tone?.thdnPercent ?? null,
    harmonics: tone?.harmonics.map(({ order, hz, dbc }) => ({ order, hz, dbc })) ?? [],
    spectrum: logSpacedSpectrum(mono, sampleRate),
  };
}
