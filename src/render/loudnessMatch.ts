/**
 * Loudness matching for fair listening comparisons (louder tends to sound better): scale a signal
 * (digital full scale = 1) to a target integrated loudness (ITU-R BS.1770-4), then lower it further
 * when needed so its sample peak stays under a ceiling. One gain for every channel and sample, so the
 * sound itself is unchanged; integrated loudness scales with that gain (L + 20 log10 g).
 */
import { integratedLoudness } from '../dsp/loudness.js';
import { measureLevels } from '../audio/levels.js';
import { amplitudeDb } from '../dsp/decibels.js';

export interface LoudnessMatchTarget {
  /** Integrated loudness to reach, LUFS (BS.1770-4). */
  targetLufs: number;
  /** Highest sample peak allowed after the gain, dBFS. */
  ceilingDbfs: number;
}

/** What `compare` matches to unless told otherwise: -18 LUFS (BS.1770-4 integrated) under a -1 dBFS sample-peak ceiling. */
export const DEFAULT_LOUDNESS_MATCH: LoudnessMatchTarget = { targetLufs: -18, ceilingDbfs: -1 };

export interface LoudnessMatchReport {
  targetLufs: number;
  ceilingDbfs: number;
  /** Integrated loudness before the gain; null when silent or shorter than one 400 ms block (not matched). */
  loudnessBeforeLufs: number | null;
  /** Gain applied, dB (0 when not matched). */
  gainDb: number;
  /** True when the ceiling held the result quieter than the target. */
  ceilingLimited: boolean;
  /** Integrated loudness after the gain (before + gain); null when not matched. */
  loudnessAfterLufs: number | null;
  /** Sample peak after the gain, dBFS; null for digital silence. */
  peakDbfs: number | null;
  /** Peak over RMS, dB (a gain does not change it); null for digital silence. */
  crestDb: number | null;
}

/** Applies the matching gain to `channels` in place and reports what it did. */
export function applyLoudnessMatch(channels: readonly (Float32Array | Float64Array)[], sampleRate: number, target: LoudnessMatchTarget): LoudnessMatchReport {
  const loudness = integratedLoudness(channels, sampleRate);
  const before = measureLevels(channels, 1); // full scale = 1
  // A finite loudness implies a non-zero peak (some block passed the -70 LKFS gate).
  const matched = Number.isFinite(loudness);
  let gainDb = 0;
  let ceilingLimited = false;
  if (matched) {
    gainDb = target.targetLufs - loudness;
    const ceilingGainDb = target.ceilingDbfs - 20 * Math.log10(before.peakVolts);
    if (ceilingGainDb < gainDb) {
      gainDb = ceilingGainDb;
      ceilingLimited = true;
    }
    const gain = 10 ** (gainDb / 20);
    for (const channel of channels) for (let i = 0; i < channel.length; i++) channel[i] *= gain;
  }
  const peak = before.peakVolts * 10 ** (gainDb / 20);
  return {
    targetLufs: target.targetLufs,
    ceilingDbfs: target.ceilingDbfs,
    loudnessBeforeLufs: matched ? loudness : null,
    gainDb,
    ceilingLimited,
    loudnessAfterLufs: matched ? loudness + gainDb : null,
    peakDbfs: amplitudeDb(peak),
    crestDb: before.crestDb,
  };
}
