// clipbench spread on the command line: the JSON keys the issue names, the HTML report with its
// plots, the terminal table, and bad options refused with one line.
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { PROJECT_ROOT, runCli } from '../helpers/cli.js';
import { writeDemoTake } from '../compare/compareFixtures.js';

const design = path.join(PROJECT_ROOT, 'fixtures', 'designs', 'soft-harbor.json');

describe('clipbench spread', () => {
  it('writes { runs, seed, tolerances, nominal, figures, sensitivity } and an HTML report; same seed, same JSON', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-spread-'));
    const run = (name: string) => {
      const result = runCli(['spread', design, '--runs', '6', '--oversample', '1', '--json', path.join(dir, `${name}.json`), '--html', path.join(dir, `${name}.html`)]);
      expect(result.status).toBe(0);
      return result;
    };
    const result = run('a');
    expect(result.stdout).toMatch(/^soft-harbor: 6 builds \(seed 1/);
    expect(result.stdout).toMatch(/gainDb\s/);
    const report = JSON.parse(readFileSync(path.join(dir, 'a.json'), 'utf8'));
    for (const key of ['runs', 'seed', 'tolerances', 'nominal', 'figures', 'sensitivity']) expect(report, key).toHaveProperty(key);
    expect(Object.keys(report.figures.gainDb).sort()).toEqual(['max', 'mean', 'min', 'p05', 'p50', 'p95', 'std']);
    for (const entry of report.sensitivity) expect(Object.keys(entry).sort()).toEqual(['figure', 'part', 'share']);
    expect(readFileSync(path.join(dir, 'a.html'), 'utf8')).toMatch(/Response band/);
    expect(existsSync(path.join(dir, 'a-response-band.svg'))).toBe(true);
    run('b');
    expect(readFileSync(path.join(dir, 'b.json'), 'utf8')).toBe(readFileSync(path.join(dir, 'a.json'), 'utf8'));
  });

  it('--take with -o renders the nominal build and the 5th and 95th percentile builds with a listening page, nominal against the low one preset blind', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-spread-take-'));
    const take = await writeDemoTake(dir, 'take.wav', 0.5);
    const out = path.join(dir, 'out');
    const result = runCli(['spread', design, '--runs', '6', '--oversample', '1', '--take', take, '-o', out, '--by', 'gainDb']);
    expect(result.status).toBe(0);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.variants.map((v: { label: string }) => v.label)).toEqual([
      'nominal',
      expect.stringMatching(/^5th percentile of gainDb \(/),
      expect.stringMatching(/^95th percentile of gainDb \(/),
    ]);
    const page = readFileSync(path.join(out, 'index.html'), 'utf8');
    expect(page).toMatch(/data-role="pick-1">[^]*?<option value="1" selected>/);
    expect(page).toMatch(/data-role="pick-2">[^]*?<option value="2" selected>/);
  });

  it('refuses bad --runs, --seed and --by, and --take without -o, with one line', () => {
    for (const args of [['--runs', '2'], ['--runs', 'many'], ['--seed', '-1'], ['--by', 'gain'], ['--take', 'x.wav']]) {
      const result = runCli(['spread', design, ...args]);
      expect(result.status).toBe(2);
      expect(result.stderr.trim().split('\n')).toHaveLength(1);
      expect(result.stderr).toMatch(new RegExp(`^clipbench: ${args[0]}`));
    }
  });
});
