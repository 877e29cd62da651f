/**
 * Safe output files: a file appears under its final name only when complete, and an output never
 * replaces one of the inputs.
 */
import { mkdirSync, readdirSync, realpathSync, rmSync, statSync } from 'node:fs';
import { open, rename, rm, type FileHandle } from 'node:fs/promises';
import { basename, dirname, join, resolve } from 'node:path';
import { DiskFullError, UserError } from '../errors.js';

let temporaryCounter = 0;

/** `.name.<pid>.<n>.tmp`: the temporary files of `writeFileAtomic`, with the writing process's id. */
const TEMPORARY_NAME = /^\..+\.(\d+)\.\d+\.tmp$/;
/** Folders this process writes into: swept once for stale temporary files, cleaned of its own on a signal. */
const outputFolders = new Set<string>();

function processIsAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Remove the temporary files in `folder` whose process id passes `belongs`. */
function removeTemporaryFiles(folder: string, belongs: (pid: number) => boolean): void {
  let names: string[];
  try {
    names = readdirSync(folder);
  } catch {
    return;
  }
  for (const name of names) {
    const match = TEMPORARY_NAME.exec(name);
    if (match && belongs(Number(match[1]))) rmSync(join(folder, name), { force: true });
  }
}

/**
 * Note a folder this process writes into; the first time, remove temporary files that processes no
 * longer running left there (a run killed by SIGKILL or a power cut).
 */
export function noteOutputFolder(folder: string): void {
  const key = resolve(folder);
  if (outputFolders.has(key)) return;
  outputFolders.add(key);
  removeTemporaryFiles(key, (pid) => pid !== process.pid && !processIsAlive(pid));
}

/** Remove this process's temporary files from every noted folder (on SIGINT or SIGTERM). */
export function removeOwnTemporaryFiles(): void {
  for (const folder of outputFolders) removeTemporaryFiles(folder, (pid) => pid === process.pid);
}

/**
 * Writes `data` to a temporary name in the target's folder (`.name.<pid>.<n>.tmp`), flushes it and
 * renames it over `path` (rename within one folder is atomic on POSIX file systems). On any failure
 * the temporary file is removed and nothing is left under the final name that was not there before.
 */
export async function writeFileAtomic(path: string, data: string | Uint8Array): Promise<void> {
  await writeFileAtomicWith(path, (handle) => handle.writeFile(data));
}

/** A device, pipe or socket (e.g. /dev/stdout, /dev/null, a FIFO): written directly, never replaced by a rename. */
function isSpecialFile(path: string): boolean {
  try {
    const target = statSync(path);
    return !target.isFile() && !target.isDirectory();
  } catch {
    return false;
  }
}

/**
 * Like `writeFileAtomic`, with the content written by `write` through an open handle (for streaming).
 * A target that is a device, pipe or socket is written straight into (it cannot hold a partial file).
 */
export async function writeFileAtomicWith(path: string, write: (handle: FileHandle) => Promise<void>): Promise<void> {
  if (isSpecialFile(path)) {
    try {
      const handle = await open(path, 'w');
      try {
        await write(handle);
      } finally {
        await handle.close();
      }
    } catch (error) {
      throw describeWriteError(error, path);
    }
    return;
  }
  noteOutputFolder(dirname(path));
  temporaryCounter += 1;
  const temporaryPath = join(dirname(path), `.${basename(path)}.${process.pid}.${temporaryCounter}.tmp`);
  try {
    const handle = await open(temporaryPath, 'wx');
    try {
      await write(handle);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temporaryPath, path);
  } catch (error) {
    await rm(temporaryPath, { force: true });
    throw describeWriteError(error, path);
  }
}

function describeWriteError(error: unknown, path: string): unknown {
  const code = (error as NodeJS.ErrnoException).code;
  if (code === 'ENOENT') return new UserError(`${path}: cannot write, the folder ${dirname(path)} does not exist`);
  if (code === 'EACCES' || code === 'EPERM' || code === 'EROFS') return new UserError(`${path}: cannot write, permission denied`);
  if (code === 'EISDIR') return new UserError(`${path}: cannot write, a folder has that name`);
  if (code === 'ENOSPC') return new DiskFullError(path);
  return error;
}

/** The real path of a file, or of its folder plus its name when the file does not exist yet. */
function canonicalPath(path: string): string {
  const absolute = resolve(path);
  try {
    return realpathSync(absolute);
  } catch {
    try {
      return join(realpathSync(dirname(absolute)), basename(absolute));
    } catch {
      return absolute;
    }
  }
}

/** Same file by device and inode (catches hard links and case-insensitive file systems), when both exist. */
function sameExistingFile(first: string, second: string): boolean {
  try {
    const a = statSync(first);
    const b = statSync(second);
    return a.dev === b.dev && a.ino === b.ino;
  } catch {
    return false;
  }
}

/** Create an output folder (and its parents), with one clear line when a file stands in the way. */
export function createOutputFolder(folder: string): void {
  try {
    mkdirSync(folder, { recursive: true });
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'EEXIST') throw new UserError(`${folder}: is not a folder (a file has that name); choose an output folder`);
    if (code === 'ENOTDIR') throw new UserError(`${folder}: a part of this path is a file, not a folder; choose an output folder`);
    if (code === 'EACCES' || code === 'EPERM' || code === 'EROFS') throw new UserError(`${folder}: cannot create the output folder, permission denied`);
    throw error;
  }
}

/** Throws a UserError when `outputPath` names the same file as any of `inputPaths` (after resolving links). */
export function assertNotAnInput(outputPath: string, inputPaths: string[]): void {
  const output = canonicalPath(outputPath);
  for (const inputPath of inputPaths) {
    if (canonicalPath(inputPath) === output || sameExistingFile(outputPath, inputPath)) {
      throw new UserError(
        `${outputPath}: refusing to overwrite the input file ${inputPath}; choose another output folder or name`,
      );
    }
  }
}
