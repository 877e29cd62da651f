// A take replaced while a run goes on must not give renders of two different takes under one
// summary: a job checks the take is still the one the command read first.
import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runRenderJob, takeFingerprint, type RenderJob } from '../../src/render/renderJob.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const take = join(root, 'fixtures/takes/pluck-mono-44k1-16bit.wav');
let folder: string;
beforeAll(async () => {
  folder = await mkdtemp(join(tmpdir(), 'clipbench-fingerprint-'));
});
afterAll(async () => {
  await rm(folder, { recursive: true, force: true });
});

const job = (outputStem: string, inputFingerprint: RenderJob['inputFingerprint']): RenderJob => ({
  designPath: join(root, 'fixtures/designs/night-drive.json'),
  overrides: [],
  inputPath: take,
  outputDir: folder,
  outputStem,
  oversample: 1,
  scale: { fullScaleVolts: 1 },
  bits: '24',
  inputFingerprint,
});

describe('take fingerprint', () => {
  it('renders a take that is as first read', async () => {
    await expect(runRenderJob(job('same', takeFingerprint(take)))).resolves.toHaveProperty('wavPath');
  });

  it('refuses a take that changed since, writing nothing', async () => {
    const changed = { ...takeFingerprint(take), modifiedMs: 0 };
    await expect(runRenderJob(job('changed', changed))).rejects.toThrow(/the take changed while the run was going on/);
    expect((await readdir(folder)).filter((name) => name.startsWith('changed'))).toEqual([]);
  });
});
