/**
 * Figures of a written (loudness-matched) WAV for the comparison: integrated loudness, sample peak,
 * crest factor, spectral centroid and the long-term average spectrum, all of the mono fold-down
 * except loudness, peak and crest (over all channels).
 */
import { readWavFile } from '../audio/wavRead.js';
import { integratedLoudness } from '../dsp/loudness.js';
import type { WelchResult } from '../dsp/welch.js';
import { measureLevels } from '../audio/levels.js';
import { logSpacedBands, longTermSpectrum, type SpectrumPoint } from './analyzeTake.js';
import { monoFoldDown } from '../audio/mixdown.js';
import { amplitudeDb } from '../dsp/decibels.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

export interface TakeMetrics {
  loudnessLufs: number | null;
  peakDbfs: number | null;
  crestDb: number | null;
  /** Power-weighted mean frequency of the long-term spectrum in 20 Hz-20 kHz; null for silence. */
  centroidHz: number | null;
  spectrum: SpectrumPoint[];
}


/**
 * Spectral centroid sum(f P(f)) / sum(P(f)) of a long-term spectrum (Welch's averaged periodogram,
 * `longTermSpectrum` in analyzeTake.ts) over 20 Hz-20 kHz: the "centre of mass" of the power
 * spectrum, a common brightness measure; the periodogram's scaling cancels. Null when there is no
 * power in the band.
 */
export function spectralCentroidHz({ values, binHz }: WelchResult): number | null {
  const lowBin = Math.ceil(AUDIO_BAND_LOW_HZ / binHz);
  const highBin = Math.min(values.length - 1, Math.floor(AUDIO_BAND_HIGH_HZ / binHz));
  let weighted = 0;
  let total = 0;
  for (let k = lowBin; k <= highBin; k++) {
    weighted += k * binHz * values[k];
    total += values[k];
  }
  return total > 0 ? weighted / total : null;
}

function finiteOrNull(value: number): number | null {
  return Number.isFinite(value) ? value : null;
}

export async function measureWrittenTake(wavPath: string): Promise<TakeMetrics> {
  const wav = await readWavFile(wavPath);
  const levels = measureLevels(wav.channels, 1); // full scale = 1
  // One long-term spectrum serves the plotted bands and the centroid.
  const spectrum = longTermSpectrum(monoFoldDown(wav.channels), wav.sampleRate);
  return {
    loudnessLufs: finiteOrNull(integratedLoudness(wav.channels, wav.sampleRate)),
    peakDbfs: amplitudeDb(levels.peakVolts),
    crestDb: levels.crestDb,
    centroidHz: spectrum === null ? null : spectralCentroidHz(spectrum),
    spectrum: spectrum === null ? [] : logSpacedBands(spectrum, wav.sampleRate),
  };
}
