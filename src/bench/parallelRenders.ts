/**
 * Wall time of a batch of renders on one core and on every core, as a user meets it: `clipbench
 * render` of 8 takes in a fresh process, once with `--threads 1` (the main thread alone) and once
 * with one thread per core (the main thread and worker threads). Both include the process start,
 * so neither side has a JIT already warmed up by the benchmark.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeWavFile } from '../audio/wavWrite.js';
import { synthesizeDemoTake } from '../audio/demoTake.js';
import { defaultThreadCount } from '../render/workerPool.js';

export interface ParallelResult {
  jobs: number;
  threads: number;
  oneThreadSeconds: number;
  allThreadsSeconds: number;
  speedup: number;
}

const TAKES = 8;
const OVERSAMPLE = 8;
const cli = fileURLToPath(new URL('../cli/main.js', import.meta.url));

export async function measureParallelRenders(designPath: string, takeSeconds: number, sampleRate: number): Promise<ParallelResult> {
  const folder = mkdtempSync(path.join(tmpdir(), 'clipbench-parallel-'));
  try {
    const takes: string[] = [];
    for (let i = 0; i < TAKES; i++) {
      const takePath = path.join(folder, `take-${i}.wav`);
      await writeWavFile(takePath, [synthesizeDemoTake({ sampleRate, seconds: takeSeconds, seed: i + 1 }).volts], sampleRate, '24');
      takes.push(takePath);
    }
    const time = (threads: number): number => {
      const output = path.join(folder, `threads-${threads}`);
      const args = [cli, 'render', designPath, ...takes, '-o', output, '--oversample', String(OVERSAMPLE), '--threads', String(threads)];
      const start = process.hrtime.bigint();
      const child = spawnSync(process.execPath, args, { encoding: 'utf8' });
      const seconds = Number(process.hrtime.bigint() - start) / 1e9;
      if (child.status !== 0) throw new Error(`benchmark render failed: ${child.stderr}`);
      return seconds;
    };
    const threads = defaultThreadCount();
    const oneThreadSeconds = time(1);
    const allThreadsSeconds = time(threads);
    return { jobs: TAKES, threads, oneThreadSeconds, allThreadsSeconds, speedup: oneThreadSeconds / allThreadsSeconds };
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}
