// Tests for src/render/workerPool.ts and jobLoop.ts, as built (dist, built by `pretest`: worker
// threads run the compiled worker script): every job of a batch ends as a result or a failure, in
// the order given, whatever thread ran it, and one bad job does not stop the others. The rendered
// files must be byte-identical to a one-thread run (renders are deterministic).
import { mkdir, mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RenderJob } from '../../src/render/renderJob.js';
import { measureWrittenTake } from '../../src/analysis/takeMetrics.js';
import { referenceThdPercent } from '../../src/analysis/referenceTone.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { readDesignFile } from '../../src/design/parseDesign.js';
import { resolveDesign } from '../../src/design/resolve.js';
import type * as Pool from '../../src/render/workerPool.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const design = join(root, 'fixtures/designs/night-drive.json');
const takes = ['pluck-mono-44k1-16bit.wav', 'pluck-stereo-48k-24bit.wav'].map((name) => join(root, 'fixtures/takes', name));

let folder: string;
let pool: typeof Pool;
beforeAll(async () => {
  folder = await mkdtemp(join(tmpdir(), 'clipbench-pool-'));
  await Promise.all(['one', 'three', 'measured'].map((run) => mkdir(join(folder, run))));
  pool = (await import(join(root, 'dist/render/workerPool.js'))) as typeof Pool;
});
afterAll(async () => {
  await rm(folder, { recursive: true, force: true });
});

function batch(outputDir: string): RenderJob[] {
  const job = (inputPath: string, stem: string, drive: string): RenderJob => ({
    designPath: design,
    overrides: [`drive=${drive}`],
    inputPath,
    outputDir,
    outputStem: stem,
    oversample: 2,
    scale: { fullScaleVolts: 1 },
    bits: '24',
  });
  return [
    job(takes[0], 'a', '0.2'),
    job(join(folder, 'no-such-take.wav'), 'missing', '0.5'),
    job(takes[1], 'b', '0.5'),
    job(takes[0], 'c', '0.9'),
    job(takes[1], 'd', '0.9'),
  ];
}

describe('render pool', () => {
  it('runs a batch on 3 threads like on 1: outcomes in order, the bad job alone fails, same bytes', async () => {
    const one = await pool.runRenderJobs(batch(join(folder, 'one')), { threads: 1 });
    let lastFraction = 0;
    const three = await pool.runRenderJobs(batch(join(folder, 'three')), { threads: 3, onProgress: (f) => (lastFraction = f) });
    expect(lastFraction).toBe(1);
    for (const outcomes of [one, three]) {
      expect(outcomes.map((o) => o.ok)).toEqual([true, false, true, true, true]);
      const failure = outcomes[1];
      expect(failure.ok === false && failure.userError).toBe(true);
      expect(failure.ok === false && failure.message).toContain('no-such-take.wav');
    }
    for (const stem of ['a', 'b', 'c', 'd']) {
      const [fromOne, fromThree] = await Promise.all(['one', 'three'].map((run) => readFile(join(folder, run, `${stem}.wav`))));
      expect(fromThree.equals(fromOne), `${stem}.wav`).toBe(true);
    }
  }, 60000);

  it("measures in the job what compare would measure on this thread: the written file's figures and the reference THD", async () => {
    const jobs = batch(join(folder, 'measured'))
      .filter((job) => !job.inputPath.includes('no-such'))
      .map((job, i) => ({ ...job, measureWritten: true, referenceThd: i === 0 }));
    const outcomes = await pool.runRenderJobs(jobs, { threads: 2 });
    for (const [i, outcome] of outcomes.entries()) {
      if (!outcome.ok) throw new Error(outcome.message);
      expect(outcome.result.metrics).toEqual(await measureWrittenTake(outcome.result.wavPath));
      expect(outcome.result.referenceThdPercent !== undefined).toBe(i === 0);
    }
    const first = outcomes[0];
    const variant = resolveDesign(await readDesignFile(design, loadPartsLibrary(), jobs[0].overrides));
    expect(first.ok && first.result.referenceThdPercent).toBe(referenceThdPercent(variant, jobs[0].oversample));
  }, 60000);
});
