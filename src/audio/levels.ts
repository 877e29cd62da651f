/** Level statistics of multichannel signals held in digital full scale. */
import { peakOf, rmsOf } from './calibration.js';
import { amplitudeDb } from '../dsp/decibels.js';

export interface LevelStats {
  peakVolts: number;
  rmsVolts: number;
  /** Peak over RMS in dB; null for silence. */
  crestDb: number | null;
}

/** Peak, RMS and crest factor over all channels, in volts (`voltsPerFullScale` x the samples). */
export function measureLevels(channels: readonly (Float32Array | Float64Array)[], voltsPerFullScale: number): LevelStats {
  const peak = peakOf(channels);
  const rms = rmsOf(channels);
  return {
    peakVolts: peak * voltsPerFullScale,
    rmsVolts: rms * voltsPerFullScale,
    crestDb: rms > 0 ? amplitudeDb(peak / rms) : null,
  };
}

/** dB relative to full scale for a value in volts; null for silence. */
export function voltsToDbfs(volts: number, voltsAtFullScale: number): number | null {
  return amplitudeDb(volts / voltsAtFullScale);
}

export interface OverReport {
  /** Samples (over all channels) whose magnitude exceeds digital full scale. */
  count: number;
  /** Time of the first over in seconds, or null. */
  firstSeconds: number | null;
  /** Highest magnitude in dBFS (can be above 0); null for silence. */
  maxDbfs: number | null;
}

/** Samples beyond digital full scale (|x| > 1). */
export function findOvers(channels: readonly (Float32Array | Float64Array)[], sampleRate: number): OverReport {
  let count = 0;
  let first = Infinity;
  let peak = 0;
  for (const channel of channels) {
    for (let i = 0; i < channel.length; i++) {
      const magnitude = Math.abs(channel[i]);
      if (magnitude > peak) peak = magnitude;
      if (magnitude > 1) {
        count++;
        if (i < first) first = i;
      }
    }
  }
  return {
    count,
    firstSeconds: count > 0 ? first / sampleRate : null,
    maxDbfs: voltsToDbfs(peak, 1),
  };
}
