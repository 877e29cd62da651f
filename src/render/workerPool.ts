/**
 * Run many render jobs over the CPU cores with worker threads. One failed job does not stop the
 * others: every job ends as a result or a failure message, in the order the jobs were given.
 */
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import { runRenderJob, type RenderJob, type RenderJobResult } from './renderJob.js';

export type WorkerReply =
  | { kind: 'progress'; index: number; done: number; total: number }
  | { kind: 'done'; index: number; result: RenderJobResult }
  | { kind: 'failed'; index: number; message: string; userError: boolean };

export type JobOutcome = { ok: true; result: RenderJobResult } | { ok: false; message: string; userError: boolean };

export interface PoolOptions {
  /** Worker threads to use; default: one per core, never more than the jobs. 1 = in this thread. */
  threads?: number;
  /** Overall progress 0..1 after each job's progress report. */
  onProgress?: (fraction: number) => void;
}

export function defaultThreadCount(): number {
  return Math.max(1, os.availableParallelism());
}

const workerScript = fileURLToPath(new URL('./renderWorker.js', import.meta.url));

export async function runRenderJobs(jobs: RenderJob[], options: PoolOptions = {}): Promise<JobOutcome[]> {
  const threads = Math.min(options.threads ?? defaultThreadCount(), jobs.length);
  const fractions = new Float64Array(jobs.length);
  const report = (index: number, fraction: number): void => {
    fractions[index] = fraction;
    options.onProgress?.(fractions.reduce((sum, f) => sum + f, 0) / jobs.length);
  };
  // Worker threads need the compiled script; from TypeScript sources (tests) run in this thread.
  if (threads <= 1 || !existsSync(workerScript)) return runInThisThread(jobs, report);

  const outcomes = new Array<JobOutcome>(jobs.length);
  let next = 0;
  const runWorker = (): Promise<void> =>
    new Promise((resolve) => {
      const worker = new Worker(workerScript);
      const sendNext = (): void => {
        if (next >= jobs.length) {
          void worker.terminate().then(() => resolve());
          return;
        }
        const index = next++;
        worker.postMessage({ index, job: jobs[index] });
      };
      worker.on('message', (reply: WorkerReply) => {
        if (reply.kind === 'progress') {
          report(reply.index, reply.done / reply.total);
          return;
        }
        outcomes[reply.index] =
          reply.kind === 'done'
            ? { ok: true, result: reply.result }
            : { ok: false, message: reply.message, userError: reply.userError };
        report(reply.index, 1);
        sendNext();
      });
      worker.on('error', (error) => {
        for (let i = 0; i < jobs.length; i++) {
          outcomes[i] ??= { ok: false, message: `worker failed: ${error.message}`, userError: false };
        }
        resolve();
      });
      sendNext();
    });
  await Promise.all(Array.from({ length: threads }, runWorker));
  return outcomes;
}

async function runInThisThread(
  jobs: RenderJob[],
  report: (index: number, fraction: number) => void,
): Promise<JobOutcome[]> {
  const outcomes: JobOutcome[] = [];
  for (let index = 0; index < jobs.length; index++) {
    try {
      const result = await runRenderJob(jobs[index], (done, total) => report(index, done / total));
      outcomes.push({ ok: true, result });
    } catch (error) {
      outcomes.push({
        ok: false,
        message: error instanceof Error ? error.message : String(error),
        userError: error instanceof Error && error.name === 'UserError',
      });
    }
    report(index, 1);
  }
  return outcomes;
}
