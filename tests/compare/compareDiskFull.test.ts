// compare on a disk that fills up: one error naming the file, and none of the run's files left behind
// (no renders without a page, no page over half the renders). The disk is simulated by refusing the
// final rename of chosen files with ENOSPC, as a full disk refuses the write; one thread, so every
// write goes through this module's mock.
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { expandVaryMatrix } from '../../src/compare/variants.js';
import { makeTempDir, NIGHT_DRIVE, writeDemoTake } from './compareFixtures.js';

const disk = vi.hoisted(() => ({ fullAt: null as RegExp | null }));

vi.mock('node:fs/promises', async (importOriginal) => {
  const actual = await importOriginal<typeof import('node:fs/promises')>();
  return {
    ...actual,
    rename: async (from: string, to: string): Promise<void> => {
      if (disk.fullAt?.test(path.basename(to))) throw Object.assign(new Error('no space left on device'), { code: 'ENOSPC' });
      await actual.rename(from, to);
    },
  };
});

const { runCompare } = await import('../../src/compare/runCompare.js');

async function compareWithDiskFullAt(pattern: RegExp): Promise<{ error: unknown; left: string[] }> {
  const dir = makeTempDir('diskfull');
  const take = await writeDemoTake(dir, 'take.wav', 0.5);
  const out = path.join(dir, 'out');
  disk.fullAt = pattern;
  let error: unknown = null;
  try {
    await runCompare({
      designPath: NIGHT_DRIVE,
      inputPaths: [take],
      outputDir: out,
      variants: expandVaryMatrix(['drive=0.2,0.5,0.8']),
      commonOverrides: [],
      match: { targetLufs: -18, ceilingDbfs: -1 },
      oversample: 2,
      scale: { fullScaleVolts: 1 },
      bits: '24',
      dither: true,
      threads: 1,
    });
  } catch (caught) {
    error = caught;
  } finally {
    disk.fullAt = null;
  }
  return { error, left: readdirSync(out) };
}

describe('compare on a full disk', () => {
  it('fails with one line when a render cannot be written, and leaves none of the renders', async () => {
    const { error, left } = await compareWithDiskFullAt(/v02-.*\.wav$/);
    expect(String(error)).toMatch(/take--v02-drive_0\.5\.wav: cannot write, the disk is full$/);
    expect(left).toEqual([]);
  });

  it('fails when the dry take cannot be written after every render was, and leaves no render and no page', async () => {
    const { error, left } = await compareWithDiskFullAt(/--dry\.wav$/);
    expect(String(error)).toMatch(/take--dry\.wav: cannot write, the disk is full$/);
    expect(left).toEqual([]);
  });

  it('fails when the page cannot be written, and leaves neither summary.json nor the renders', async () => {
    const { error, left } = await compareWithDiskFullAt(/^index\.html$/);
    expect(String(error)).toMatch(/index\.html: cannot write, the disk is full$/);
    expect(left).toEqual([]);
  });
});
