import { spawn, spawnSync } from 'node:child_process';
import { linkSync, lstatSync, mkdirSync, statSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join, relative } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { assertNotAnInput, noteOutputFolder, removeOwnTemporaryFiles, writeFileAtomic } from '../../src/audio/atomicWrite.js';
import { UserError } from '../../src/errors.js';

const root = mkdtempSync(join(tmpdir(), 'clipbench-atomic-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

let folderCount = 0;
function freshFolder(): string {
  folderCount += 1;
  const folder = join(root, `case-${folderCount}`);
  mkdirSync(folder);
  return folder;
}

describe('writeFileAtomic', () => {
  test('writes bytes and text, leaving only the final file', async () => {
    const folder = freshFolder();
    await writeFileAtomic(join(folder, 'a.bin'), Uint8Array.from([1, 2, 3]));
    await writeFileAtomic(join(folder, 'b.json'), '{"x":1}\n');
    expect(Array.from(readFileSync(join(folder, 'a.bin')))).toEqual([1, 2, 3]);
    expect(readFileSync(join(folder, 'b.json'), 'utf8')).toBe('{"x":1}\n');
    expect(readdirSync(folder).sort()).toEqual(['a.bin', 'b.json']);
  });

  test('replaces an existing file whole', async () => {
    const folder = freshFolder();
    const path = join(folder, 'take.wav');
    writeFileSync(path, 'old contents that are longer than the new ones');
    await writeFileAtomic(path, 'new');
    expect(readFileSync(path, 'utf8')).toBe('new');
    expect(readdirSync(folder)).toEqual(['take.wav']);
  });

  test('a missing output folder is a UserError and creates nothing', async () => {
    const folder = freshFolder();
    const path = join(folder, 'nowhere', 'out.wav');
    await expect(writeFileAtomic(path, 'x')).rejects.toThrow(UserError);
    await expect(writeFileAtomic(path, 'x')).rejects.toThrow(/does not exist/);
    expect(readdirSync(folder)).toEqual([]);
  });

  test('when the rename fails (a folder holds the name) the temporary file is removed', async () => {
    const folder = freshFolder();
    mkdirSync(join(folder, 'out.wav'));
    writeFileSync(join(folder, 'out.wav', 'keep.txt'), 'keep');
    await expect(writeFileAtomic(join(folder, 'out.wav'), 'x')).rejects.toThrow(UserError);
    expect(readdirSync(folder)).toEqual(['out.wav']);
    expect(readFileSync(join(folder, 'out.wav', 'keep.txt'), 'utf8')).toBe('keep');
  });

  test('a device behind a link (/dev/null) is written into, not replaced by a rename', async () => {
    const folder = freshFolder();
    const link = join(folder, 'report.json');
    symlinkSync('/dev/null', link);
    await writeFileAtomic(link, '{"x":1}\n');
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(statSync('/dev/null').isCharacterDevice()).toBe(true);
    expect(readdirSync(folder)).toEqual(['report.json']);
  });

  test('a named pipe receives the data and stays a pipe', async () => {
    const folder = freshFolder();
    const fifo = join(folder, 'pipe');
    if (spawnSync('mkfifo', [fifo]).status !== 0) return; // no mkfifo on this system
    const reader = spawn('cat', [fifo]);
    let received = '';
    reader.stdout.on('data', (chunk: Buffer) => (received += chunk.toString()));
    const done = new Promise((resolve) => reader.on('close', resolve));
    await writeFileAtomic(fifo, 'through the pipe');
    await done;
    expect(received).toBe('through the pipe');
    expect(statSync(fifo).isFIFO()).toBe(true);
  });

  test('concurrent writes to one folder do not collide on temporary names', async () => {
    const folder = freshFolder();
    const names = Array.from({ length: 20 }, (_, i) => `f${i}.txt`);
    await Promise.all(names.map((name) => writeFileAtomic(join(folder, name), name)));
    expect(readdirSync(folder).sort()).toEqual([...names].sort());
    for (const name of names) expect(readFileSync(join(folder, name), 'utf8')).toBe(name);
  });
});

describe('temporary files of interrupted runs', () => {
  test('stale ones of dead processes are swept on the next write; ours go on removeOwnTemporaryFiles', async () => {
    const folder = freshFolder();
    const finished = spawnSync(process.execPath, ['-e', '']);
    const deadPid = finished.pid as number; // a process that has exited
    const stale = `.take.wav.${deadPid}.1.tmp`;
    const ours = `.page.html.${process.pid}.7.tmp`;
    writeFileSync(join(folder, stale), 'half a render');
    writeFileSync(join(folder, ours), 'being written');
    writeFileSync(join(folder, 'keep.tmp'), 'not ours: no pid pattern');
    await writeFileAtomic(join(folder, 'out.json'), '{}');
    expect(readdirSync(folder).sort()).toEqual([ours, 'keep.tmp', 'out.json'].sort());
    noteOutputFolder(folder);
    removeOwnTemporaryFiles();
    expect(readdirSync(folder).sort()).toEqual(['keep.tmp', 'out.json']);
  });
});

describe('assertNotAnInput', () => {
  const folder = freshFolder();
  const input = join(folder, 'di.wav');
  writeFileSync(input, 'input');

  test('refuses the same path', () => {
    expect(() => assertNotAnInput(input, [input])).toThrow(UserError);
    expect(() => assertNotAnInput(input, [input])).toThrow(/refusing to overwrite the input/);
  });

  test('refuses a different spelling of the same path (relative, with ./ and ..)', () => {
    const relativeSpelling = relative(process.cwd(), input);
    const dottedSpelling = `${folder}/./../${basename(folder)}/di.wav`;
    expect(() => assertNotAnInput(relativeSpelling, [input])).toThrow(UserError);
    expect(() => assertNotAnInput(input, ['./' + relativeSpelling])).toThrow(UserError);
    expect(() => assertNotAnInput(dottedSpelling, [input])).toThrow(UserError);
  });

  test('refuses a symbolic link or a hard link to the input', () => {
    const symbolic = join(folder, 'link.wav');
    const hard = join(folder, 'hard.wav');
    symlinkSync(input, symbolic);
    linkSync(input, hard);
    expect(() => assertNotAnInput(symbolic, [input])).toThrow(UserError);
    expect(() => assertNotAnInput(hard, [input])).toThrow(UserError);
  });

  test('refuses when the output folder is reached through a link to the input folder', () => {
    const linkedFolder = join(root, 'linked-folder');
    symlinkSync(folder, linkedFolder);
    expect(() => assertNotAnInput(join(linkedFolder, 'di.wav'), [join(root, 'other.wav'), input])).toThrow(UserError);
  });

  test('accepts other files, including ones that do not exist yet', () => {
    expect(() => assertNotAnInput(join(folder, 'di.render.wav'), [input])).not.toThrow();
    expect(() => assertNotAnInput(join(folder, 'missing', 'x.wav'), [input])).not.toThrow();
    expect(() => assertNotAnInput(input, [])).not.toThrow();
  });
});
