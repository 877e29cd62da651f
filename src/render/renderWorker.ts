/** Worker-thread entry: runs render jobs sent by `runRenderJobs` and posts results back. */
import { parentPort } from 'node:worker_threads';
import { UserError } from '../errors.js';
import { runRenderJob, type RenderJob } from './renderJob.js';
import type { WorkerReply } from './workerPool.js';

const port = parentPort;
if (port === null) throw new Error('renderWorker must run in a worker thread');

port.on('message', (message: { index: number; job: RenderJob }) => {
  const { index, job } = message;
  const reply = (payload: WorkerReply): void => port.postMessage(payload);
  runRenderJob(job, (done, total) => reply({ kind: 'progress', index, done, total }))
    .then((result) => reply({ kind: 'done', index, result }))
    .catch((error: unknown) =>
      reply({
        kind: 'failed',
        index,
        message: error instanceof Error ? error.message : String(error),
        userError: error instanceof UserError,
      }),
    );
});
