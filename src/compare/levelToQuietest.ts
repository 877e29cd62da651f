/**
 * Fair loudness when the peak ceiling wins: if the ceiling kept any player of a take below the
 * target, every louder player of that take is turned down to the quietest one's loudness, so the
 * blind test compares them at one loudness (louder tends to sound better). Turning down never meets
 * the ceiling, so one pass suffices.
 */
import path from 'node:path';
import { readWavFile } from '../audio/wavRead.js';
import { writeWavFile, type WavOutputBits } from '../audio/wavWrite.js';
import { measureWrittenTake, type TakeMetrics } from '../analysis/takeMetrics.js';
import type { CompareEntry } from './summary.js';

/** Players within this of the quietest already match it (a tenth of a loudness unit's display step). */
const LEVEL_TOLERANCE_DB = 0.05;

export interface LevelledTake {
  /** The loudness every sounding player of the take now has, LUFS; null when no ceiling held any. */
  sharedLufs: number | null;
  /** New metrics of each file that was turned down, by file name. */
  remeasured: Map<string, TakeMetrics>;
}

export async function levelToQuietest(entries: CompareEntry[], outputDir: string, bits: WavOutputBits, dither: boolean): Promise<LevelledTake> {
  const remeasured = new Map<string, TakeMetrics>();
  const sounding = entries.filter((entry) => entry.file !== null && entry.loudnessLufs !== null);
  if (!sounding.some((entry) => entry.ceilingLimited)) return { sharedLufs: null, remeasured };
  const quietest = Math.min(...sounding.map((entry) => entry.loudnessLufs as number));
  for (const entry of sounding) {
    const turnDownDb = quietest - (entry.loudnessLufs as number);
    if (turnDownDb > -LEVEL_TOLERANCE_DB) continue;
    const file = path.join(outputDir, entry.file as string);
    const wav = await readWavFile(file);
    const gain = 10 ** (turnDownDb / 20);
    const channels = wav.channels.map((channel) => Float64Array.from(channel, (v) => v * gain));
    await writeWavFile(file, channels, wav.sampleRate, bits, dither);
    const metrics = await measureWrittenTake(file);
    remeasured.set(entry.file as string, metrics);
    entry.gainDb += turnDownDb;
    entry.levelledToQuietest = true;
    entry.loudnessLufs = metrics.loudnessLufs;
    entry.peakDbfs = metrics.peakDbfs;
    entry.crestDb = metrics.crestDb;
  }
  return { sharedLufs: quietest, remeasured };
}
