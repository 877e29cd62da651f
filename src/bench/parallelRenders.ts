/**
 * Wall time of a batch of renders (8 variants of one take, as `compare` makes them) on one worker
 * thread and on every core, so the benchmark can show what the worker pool buys.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { writeWavFile } from '../audio/wavWrite.js';
import { synthesizeDemoTake } from '../audio/demoTake.js';
import { defaultThreadCount, runRenderJobs } from '../render/workerPool.js';
import type { RenderJob } from '../render/renderJob.js';

export interface ParallelResult {
  jobs: number;
  threads: number;
  oneThreadSeconds: number;
  allThreadsSeconds: number;
  speedup: number;
}

const VARIANTS = 8;

export async function measureParallelRenders(designPath: string, takeSeconds: number, sampleRate: number): Promise<ParallelResult> {
  const folder = mkdtempSync(path.join(tmpdir(), 'clipbench-parallel-'));
  try {
    const takePath = path.join(folder, 'take.wav');
    await writeWavFile(takePath, [synthesizeDemoTake({ sampleRate, seconds: takeSeconds }).volts], sampleRate, '24');
    const jobs: RenderJob[] = Array.from({ length: VARIANTS }, (_, i) => ({
      designPath,
      overrides: [`drive=${(i / (VARIANTS - 1)).toFixed(3)}`],
      inputPath: takePath,
      outputDir: folder,
      outputStem: `variant-${i}`,
      oversample: 8,
      scale: { fullScaleVolts: 1 },
      bits: '24',
    }));
    const time = async (threads: number): Promise<number> => {
      const start = process.hrtime.bigint();
      const outcomes = await runRenderJobs(jobs, { threads });
      if (outcomes.some((outcome) => !outcome.ok)) throw new Error('a benchmark render failed');
      return Number(process.hrtime.bigint() - start) / 1e9;
    };
    const threads = defaultThreadCount();
    // One thread renders in this process; the pool adds worker start-up, which the timing includes.
    const oneThreadSeconds = await time(1);
    const allThreadsSeconds = await time(threads);
    return { jobs: VARIANTS, threads, oneThreadSeconds, allThreadsSeconds, speedup: oneThreadSeconds / allThreadsSeconds };
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}
