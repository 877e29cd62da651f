/**
 * Repeated runs are byte-identical (issue 6 "Files"; the project rule: same inputs give
 * bit-identical outputs). `render` has its own repeat test in tests/cli/render.test.ts; here
 * `measure --json`, `analyze --json`, `check --json` and every file `compare` writes.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { encodeWav } from '../../src/audio/wavWrite.js';
import { PROJECT_ROOT, runCliAsync } from '../helpers/cli.js';

const NIGHT_DRIVE = path.join(PROJECT_ROOT, 'fixtures', 'designs', 'night-drive.json');
const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-repeat-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const take = path.join(dir, 'take.wav');

beforeAll(() => {
  // 1 s at 48 kHz: a decaying 196 Hz tone with some third harmonic (a plucked G, roughly).
  const x = new Float32Array(48000);
  for (let n = 0; n < x.length; n++) {
    const t = n / 48000;
    x[n] = 0.4 * Math.exp(-3 * t) * (Math.sin(2 * Math.PI * 196 * t) + 0.2 * Math.sin(2 * Math.PI * 588 * t));
  }
  writeFileSync(take, encodeWav([x], 48000, '24'));
});

/** Runs the same command twice (at once) with its output under run-a / run-b; returns both stdouts. */
async function twice(args: (run: string) => string[]): Promise<[string, string]> {
  const results = await Promise.all(['run-a', 'run-b'].map((run) => runCliAsync(args(path.join(dir, run)))));
  for (const result of results) expect(result.status, result.stderr).toBe(0);
  return [results[0]!.stdout, results[1]!.stdout];
}

function sameFile(a: string, b: string): void {
  expect(readFileSync(a).equals(readFileSync(b)), `${a} vs ${b}`).toBe(true);
}

describe.concurrent('repeated runs give byte-identical output', () => {
  test('measure --json', async () => {
    await twice((run) => ['measure', NIGHT_DRIVE, '--oversample', '2', '--json', `${run}-measure.json`]);
    sameFile(path.join(dir, 'run-a-measure.json'), path.join(dir, 'run-b-measure.json'));
  });

  test('analyze --json', async () => {
    await twice((run) => ['analyze', take, '--json', `${run}-analyze.json`]);
    sameFile(path.join(dir, 'run-a-analyze.json'), path.join(dir, 'run-b-analyze.json'));
  });

  test('check --json (stdout)', async () => {
    const [a, b] = await twice(() => ['check', NIGHT_DRIVE, '--json']);
    expect(a.length).toBeGreaterThan(0);
    expect(b).toBe(a);
  });

  test('compare: summary.json, the page and every WAV and sidecar', async () => {
    await twice((run) => ['compare', NIGHT_DRIVE, take, '--vary', 'clip.diode=1n4148,1n34a', '-o', `${run}-compare`, '--oversample', '2', '--threads', '2']);
    const a = path.join(dir, 'run-a-compare');
    const b = path.join(dir, 'run-b-compare');
    const files = readdirSync(a).sort();
    expect(files).toContain('summary.json');
    expect(readdirSync(b).sort()).toEqual(files);
    for (const file of files) sameFile(path.join(a, file), path.join(b, file));
  });
});
