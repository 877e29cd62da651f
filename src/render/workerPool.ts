/**
 * Run many render jobs over the CPU cores: this thread and `threads - 1` worker threads each run the
 * job loop (jobLoop.ts) on one shared counter, so a batch pays for one worker start-up fewer and a
 * worker never waits for this thread, busy rendering, to hand it work. One failed job does not stop
 * the others: every job ends as a result or a failure message, in the order the jobs were given.
 */
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import type { RenderJob, RenderJobResult } from './renderJob.js';
import { createJobCounter, runJobsFromCounter, type JobReply } from './jobLoop.js';

export type JobOutcome = { ok: true; result: RenderJobResult } | { ok: false; message: string; userError: boolean; diskFull: boolean };

export interface PoolOptions {
  /** Threads to render on, this one included; default: one per core, never more than the jobs. */
  threads?: number;
  /** Overall progress 0..1 after each job's progress report. */
  onProgress?: (fraction: number) => void;
}

export function defaultThreadCount(): number {
  return Math.max(1, os.availableParallelism());
}

const workerScript = fileURLToPath(new URL('./renderWorker.js', import.meta.url));

export async function runRenderJobs(jobs: RenderJob[], options: PoolOptions = {}): Promise<JobOutcome[]> {
  // Worker threads need the compiled script; from TypeScript sources (tests) everything runs here.
  const threads = existsSync(workerScript) ? Math.max(1, Math.min(options.threads ?? defaultThreadCount(), jobs.length)) : 1;
  const fractions = new Float64Array(jobs.length);
  const outcomes = new Array<JobOutcome | undefined>(jobs.length);
  const handle = (reply: JobReply): void => {
    if (reply.kind === 'progress') {
      fractions[reply.index] = reply.done / reply.total;
    } else {
      outcomes[reply.index] =
        reply.kind === 'done' ? { ok: true, result: reply.result } : { ok: false, message: reply.message, userError: reply.userError, diskFull: reply.diskFull };
      fractions[reply.index] = 1;
    }
    options.onProgress?.(fractions.reduce((sum, f) => sum + f, 0) / jobs.length);
  };

  const counter = createJobCounter();
  let workerFailure = '';
  const runWorker = (): Promise<void> =>
    new Promise((resolve) => {
      const worker = new Worker(workerScript, { workerData: { jobs, counter } });
      worker.on('message', (message: JobReply | { kind: 'finished' }) => {
        if (message.kind !== 'finished') return handle(message);
        // Its jobs are done: end the thread now rather than wait for handles it may keep open.
        void worker.terminate();
        resolve();
      });
      worker.on('error', (error) => {
        workerFailure = error.message;
        resolve();
      });
      worker.on('exit', () => resolve());
    });
  const workers = Array.from({ length: threads - 1 }, runWorker);
  await Promise.all([...workers, runJobsFromCounter(jobs, counter, handle)]);
  // Only a job whose worker died has no outcome.
  return outcomes.map((outcome) => outcome ?? { ok: false, message: `worker failed: ${workerFailure || 'it stopped'}`, userError: false, diskFull: false });
}
