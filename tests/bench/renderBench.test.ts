// Tests for src/bench/renderBench.ts (`npm run bench`), run as built (dist, built by `pretest`) on a
// short take: the JSON holds every figure the speed issue asks for, with sane values. Speed targets
// are not tested here (they belong to the bench itself); the clipper's fidelity targets are: waveform
// error <= -60 dB and harmonic levels within 0.05 dB of the per-sample Newton-Raphson reference at 8x.
import { spawnSync } from 'node:child_process';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
// Types only: importing the script itself would run the bench.
import type { BenchReport } from '../../src/bench/renderBench.js';

const bench = fileURLToPath(new URL('../../dist/bench/renderBench.js', import.meta.url));

describe('npm run bench', () => {
  it('reports speed, memory, parallel runs and clipper fidelity per factor', async () => {
    const folder = await mkdtemp(join(tmpdir(), 'clipbench-bench-test-'));
    try {
      const json = join(folder, 'bench.json');
      const args = ['--seconds', '2', '--factors', '1,8', '--runs', '2', '--memory-minutes', '0.1', '--parallel-seconds', '0.5', '--circuit-seconds', '0.3', '--json', json];
      const child = spawnSync(process.execPath, [bench, ...args], { encoding: 'utf8' });
      expect(child.stderr).toBe('');
      expect(child.stdout).toMatch(/Targets at 8x: >= 100x real time: (met|NOT met); clipper error <= -60 dB: met; harmonics within 0.05 dB: met/);
      const report = JSON.parse(await readFile(json, 'utf8')) as BenchReport;
      expect(report.results.map((r) => r.oversample)).toEqual([1, 8]);
      for (const r of report.results) {
        expect(r.realTime).toBeGreaterThan(0);
        expect(r.realTime).toBeGreaterThanOrEqual(r.realTimeMedian); // fastest run vs median
        // ns per oversampled sample and x real time describe the same fastest run.
        expect(r.nsPerOversampledSample * 1e-9 * 48000 * r.oversample * r.realTime).toBeCloseTo(1, 6);
        expect(r.peakRssMiB).toBeGreaterThan(0);
        expect(r.clipperSpeedupVsNewton).toBeGreaterThan(0);
      }
      const at8 = report.results[1];
      expect(at8.clipperWaveformErrorDb).toBeLessThanOrEqual(-60);
      expect(at8.clipperHarmonicDeltaDb).toBeLessThanOrEqual(0.05);
      // A 6 s take: decoded audio 6 s x 48000 x 4 bytes.
      expect(report.memory?.decodedMiB).toBeCloseTo((6 * 48000 * 4) / 2 ** 20, 3);
      expect(report.memory!.peakRssMiB).toBeGreaterThan(report.memory!.baselineMiB);
      expect(report.parallel?.jobs).toBe(8);
      expect(report.circuits.map((c) => c.design)).toEqual(['harbor-lights', 'ember-twin']);
      for (const c of report.circuits) {
        expect(c.realTime).toBeGreaterThan(0);
        // The fidelity goal: the render's response within 0.1 dB of the analog circuit's to 10 kHz, 0.3 dB to 20 kHz.
        expect(c.responseErrorTo10kDb).toBeLessThanOrEqual(0.1);
        expect(c.responseErrorTo20kDb).toBeLessThanOrEqual(0.3);
      }
    } finally {
      await rm(folder, { recursive: true, force: true });
    }
  }, 120000);

  it('prints its options for --help and refuses a bad option in one line, exit status 2', () => {
    const help = spawnSync(process.execPath, [bench, '--help'], { encoding: 'utf8' });
    expect(help.status).toBe(0);
    for (const flag of ['--seconds', '--factors', '--runs', '--memory-minutes', '--parallel-seconds', '--circuit-seconds', '--json']) expect(help.stdout).toContain(flag);
    for (const [args, named] of [
      [['--runs', '0'], '--runs'],
      [['--factors', '8,3'], '--factors'],
      [['--seconds', 'soon'], '--seconds'],
      [['--json', '/no/such/folder/bench.json'], '--json'],
      [['--loud'], '--loud'],
    ] as const) {
      const child = spawnSync(process.execPath, [bench, ...args], { encoding: 'utf8' });
      expect(child.status, args.join(' ')).toBe(2);
      expect(child.stdout).toBe('');
      expect(child.stderr.trim().split('\n')).toHaveLength(1);
      expect(child.stderr).toContain(named);
    }
  });
});
