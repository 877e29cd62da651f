/**
 * The job loop every render thread runs, the main thread and each worker alike: take the next job
 * index from a shared counter (Atomics, so no thread waits for another to hand out work), render it,
 * report progress and the end of each job, until no jobs are left.
 */
import { DiskFullError, UserError } from '../errors.js';
import { runRenderJob, type RenderJob, type RenderJobResult } from './renderJob.js';

export type JobReply =
  | { kind: 'progress'; index: number; done: number; total: number }
  | { kind: 'done'; index: number; result: RenderJobResult }
  | { kind: 'failed'; index: number; message: string; userError: boolean; diskFull: boolean };

/** A counter the job loops share: one Int32 on a SharedArrayBuffer, the next job's index. */
export function createJobCounter(): Int32Array {
  return new Int32Array(new SharedArrayBuffer(Int32Array.BYTES_PER_ELEMENT));
}

export async function runJobsFromCounter(jobs: readonly RenderJob[], counter: Int32Array, reply: (message: JobReply) => void): Promise<void> {
  for (;;) {
    const index = Atomics.add(counter, 0, 1);
    if (index >= jobs.length) return;
    try {
      const result = await runRenderJob(jobs[index], (done, total) => reply({ kind: 'progress', index, done, total }));
      reply({ kind: 'done', index, result });
    } catch (error) {
      reply({
        kind: 'failed',
        index,
        message: error instanceof Error ? error.message : String(error),
        userError: error instanceof UserError,
        diskFull: error instanceof DiskFullError,
      });
    }
  }
}
