/**
 * One run at a time per output folder: a lock file holding the owner's process id. A second run into
 * the folder is refused with one line; a lock left by a process that no longer runs is taken over.
 */
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { UserError } from '../errors.js';

export const LOCK_FILE_NAME = '.clipbench.lock';

const heldLocks = new Set<string>();

function ownerIsRunning(lockPath: string): number | null {
  let pid: number;
  try {
    pid = Number(readFileSync(lockPath, 'utf8').trim());
  } catch {
    return null;
  }
  if (!Number.isInteger(pid) || pid <= 0 || pid === process.pid) return null;
  try {
    process.kill(pid, 0);
    return pid;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM' ? pid : null;
  }
}

/** Lock `folder` (which must exist) for this process; returns the release function. */
export function lockOutputFolder(folder: string): () => void {
  const lockPath = join(resolve(folder), LOCK_FILE_NAME);
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      writeFileSync(lockPath, `${process.pid}\n`, { flag: 'wx' });
      heldLocks.add(lockPath);
      return () => {
        heldLocks.delete(lockPath);
        rmSync(lockPath, { force: true });
      };
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
      const owner = ownerIsRunning(lockPath);
      if (owner !== null) {
        throw new UserError(`${folder}: another clipbench run (process ${owner}) is writing into this folder; wait for it to finish or choose another output folder`);
      }
      rmSync(lockPath, { force: true }); // stale: its process has ended
    }
  }
  throw new UserError(`${folder}: could not lock the output folder (${LOCK_FILE_NAME} keeps reappearing)`);
}

/** Release every lock this process holds (on SIGINT or SIGTERM). */
export function releaseAllLocks(): void {
  for (const lockPath of heldLocks) rmSync(lockPath, { force: true });
  heldLocks.clear();
}
