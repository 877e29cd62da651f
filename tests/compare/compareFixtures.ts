/** Short takes and a quick comparison run shared by the compare tests (1.5 s, oversample 2). */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { synthesizeDemoTake } from '../../src/audio/demoTake.js';
import { writeWavFile } from '../../src/audio/wavWrite.js';

export const NIGHT_DRIVE = fileURLToPath(new URL('../../fixtures/designs/night-drive.json', import.meta.url));

export function makeTempDir(prefix: string): string {
  return mkdtempSync(path.join(tmpdir(), `clipbench-${prefix}-`));
}

/** The program's own deterministic plucked-string take (peak 0.45 of full scale), mono, 48 kHz. */
export async function writeDemoTake(dir: string, name: string, seconds = 1.5): Promise<string> {
  const take = synthesizeDemoTake({ seconds });
  const file = path.join(dir, name);
  await writeWavFile(file, [take.volts], take.sampleRate, '24');
  return file;
}
