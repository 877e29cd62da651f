/** A failure after the data is written (rename refused) must leave the old file intact and no temporary file. */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, expect, test, vi } from 'vitest';

const failure = vi.hoisted(() => ({ renameFails: false }));

vi.mock('node:fs/promises', async (importOriginal) => {
  const actual = await importOriginal<typeof import('node:fs/promises')>();
  return {
    ...actual,
    rename: async (from: string, to: string): Promise<void> => {
      if (failure.renameFails) throw Object.assign(new Error('simulated I/O failure'), { code: 'EIO' });
      await actual.rename(from, to);
    },
  };
});

const { writeFileAtomic } = await import('../../src/audio/atomicWrite.js');

const folder = mkdtempSync(join(tmpdir(), 'clipbench-atomic-fail-'));
afterAll(() => rmSync(folder, { recursive: true, force: true }));

test('a failed write keeps the previous file and removes the temporary one', async () => {
  const path = join(folder, 'render.wav');
  writeFileSync(path, 'complete earlier render');
  failure.renameFails = true;
  await expect(writeFileAtomic(path, new Uint8Array(100_000).fill(7))).rejects.toThrow(/simulated I\/O failure/);
  failure.renameFails = false;
  expect(readFileSync(path, 'utf8')).toBe('complete earlier render');
  expect(readdirSync(folder)).toEqual(['render.wav']);
});

test('a failed first write leaves nothing behind', async () => {
  failure.renameFails = true;
  await expect(writeFileAtomic(join(folder, 'new.wav'), 'data')).rejects.toThrow();
  failure.renameFails = false;
  expect(readdirSync(folder)).toEqual(['render.wav']);
});
