/**
 * Worker-thread entry: runs the job loop (jobLoop.ts) on the jobs and shared counter it was started
 * with, posts every reply, then a last 'finished' message.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { RenderJob } from './renderJob.js';
import { runJobsFromCounter } from './jobLoop.js';

const port = parentPort;
if (port === null) throw new Error('renderWorker must run in a worker thread');

const { jobs, counter } = workerData as { jobs: RenderJob[]; counter: Int32Array };
await runJobsFromCounter(jobs, counter, (reply) => port.postMessage(reply));
port.postMessage({ kind: 'finished' });
