/**
 * Figures of a written (loudness-matched) WAV for the comparison: integrated loudness, sample peak,
 * crest factor, spectral centroid and the long-term average spectrum, all of the mono fold-down
 * except loudness, peak and crest (over all channels).
 */
import { readWavFile } from '../audio/wavRead.js';
import { integratedLoudness } from '../dsp/loudness.js';
import { floorPowerOfTwo } from '../dsp/fft.js';
import { welch } from '../dsp/welch.js';
import { measureLevels } from '../render/levels.js';
import { logSpacedSpectrum, type SpectrumPoint } from './analyzeTake.js';
import { monoFoldDown } from '../audio/mixdown.js';

export interface TakeMetrics {
  loudnessLufs: number | null;
  peakDbfs: number | null;
  crestDb: number | null;
  /** Power-weighted mean frequency of the long-term spectrum in 20 Hz-20 kHz; null for silence. */
  centroidHz: number | null;
  spectrum: SpectrumPoint[];
}

const CENTROID_LOW_HZ = 20;
const CENTROID_HIGH_HZ = 20_000;
/** Welch segment for the centroid: 4096 samples at 48 kHz (11.7 Hz bins), scaled with the rate. */
const CENTROID_SEGMENT_SECONDS = 4096 / 48000;
const MIN_CENTROID_SEGMENT = 256;

/**
 * Spectral centroid sum(f P(f)) / sum(P(f)) of Welch's averaged periodogram over 20 Hz-20 kHz
 * (the "centre of mass" of the power spectrum, a common brightness measure). Null when the signal
 * is shorter than one segment or has no power in the band.
 */
export function spectralCentroidHz(signal: Float64Array, sampleRate: number): number | null {
  const wanted = floorPowerOfTwo(Math.max(1, CENTROID_SEGMENT_SECONDS * sampleRate));
  const segmentLength = Math.min(wanted, floorPowerOfTwo(Math.max(1, signal.length)));
  if (segmentLength < MIN_CENTROID_SEGMENT) return null;
  const { values, binHz } = welch(signal, sampleRate, { segmentLength, scaling: 'density' });
  const lowBin = Math.ceil(CENTROID_LOW_HZ / binHz);
  const highBin = Math.min(values.length - 1, Math.floor(CENTROID_HIGH_HZ / binHz));
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
  const mono = monoFoldDown(wav.channels);
  return {
    loudnessLufs: finiteOrNull(integratedLoudness(wav.channels, wav.sampleRate)),
    peakDbfs: levels.peakVolts > 0 ? 20 * Math.log10(levels.peakVolts) : null,
    crestDb: levels.rmsVolts > 0 ? levels.crestDb : null,
    centroidHz: spectralCentroidHz(mono, wav.sampleRate),
    spectrum: logSpacedSpectrum(mono, wav.sampleRate),
  };
}
