/**
 * The dry take as a player of its own: the input's samples written to the output folder, loudness
 * matched like the renders (or unchanged with --no-match), so "no pedal" is compared fairly too.
 */
import type { DecodedWav } from '../audio/wavRead.js';
import { writeWavFile, type WavOutputBits } from '../audio/wavWrite.js';
import { applyLoudnessMatch, type LoudnessMatchReport, type LoudnessMatchTarget } from '../render/loudnessMatch.js';

/** Writes the dry take to `wavPath`; returns the matching report, or null with no matching. */
export async function writeDryTake(
  wav: DecodedWav,
  wavPath: string,
  match: LoudnessMatchTarget | null,
  bits: WavOutputBits,
  dither: boolean,
): Promise<LoudnessMatchReport | null> {
  const channels = wav.channels.map((channel) => Float64Array.from(channel));
  const report = match ? applyLoudnessMatch(channels, wav.sampleRate, match) : null;
  await writeWavFile(wavPath, channels, wav.sampleRate, bits, dither);
  return report;
}
