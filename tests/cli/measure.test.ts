import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { PROJECT_ROOT, runCli } from '../helpers/cli.js';

const design = path.join(PROJECT_ROOT, 'fixtures', 'designs', 'night-drive.json');

describe('clipbench measure', () => {
  it('prints a summary and writes JSON with the documented keys, HTML and one SVG per plot', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-measure-'));
    const json = path.join(dir, 'm.json');
    const html = path.join(dir, 'm.html');
    const result = runCli(['measure', design, '--oversample', '2', '--set', 'drive=0.3', '--json', json, '--html', html]);
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/THD/);
    const report = JSON.parse(readFileSync(json, 'utf8'));
    for (const key of ['thdPercent', 'thdnPercent', 'harmonics', 'thdByLevel', 'onset', 'response', 'responseMeasured', 'transfer', 'aliasDbc', 'gainDb', 'maxOutputVolts']) {
      expect(report, key).toHaveProperty(key);
    }
    expect(Object.keys(report.onset).sort()).toEqual(['1', '10', '3']);
    expect(Object.keys(report.noise).sort()).toEqual(
      ['aWeightedDbv', 'aWeightedVolts', 'contributors', 'densityPerHz', 'referenceVolts', 'snrDb', 'source', 'unweightedDbv', 'unweightedVolts'].sort(),
    );
    expect(report.noise.source).toBe('pickup (10k + 3 H)');
    // A-weighting takes away more than it adds for noise spread over the band (it is below 0 dB under 1 kHz and above 5 kHz).
    expect(report.noise.aWeightedVolts).toBeLessThan(report.noise.unweightedVolts);
    const shares = report.noise.contributors.reduce((sum: number, c: { share: number }) => sum + c.share, 0);
    expect(shares).toBeCloseTo(1, 9);
    expect(result.stdout).toMatch(/output noise, A-weighted\s+-\d+\.\d dBV/);
    expect(report.harmonics[0]).toEqual(expect.objectContaining({ order: 2 }));
    // A symmetric 1N4148 pair: odd harmonics dominate (a symmetric odd nonlinearity makes no even harmonics; Fourier series symmetry).
    expect(report.harmonics[1].dbc).toBeGreaterThan(report.harmonics[0].dbc + 60);
    const page = readFileSync(html, 'utf8');
    expect(page).toMatch(/<svg/);
    expect(page).not.toMatch(/<script src=|<link /); // self-contained: nothing loaded from elsewhere
    expect(page).toContain('Output noise density');
    for (const plot of ['harmonics', 'thd-by-level', 'response', 'phase', 'transfer', 'noise']) {
      expect(existsSync(path.join(dir, `m-${plot}.svg`)), plot).toBe(true);
    }
  });

  it('a silent output (level knob at 0) gives null in JSON and n/a in the table, not -Infinity, -999 or THD 0 %', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-measure-silent-'));
    const json = path.join(dir, 'm.json');
    const result = runCli(['measure', design, '--oversample', '1', '--set', 'level=0', '--json', json]);
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    const text = readFileSync(json, 'utf8');
    expect(text).not.toMatch(/-999|Infinity|-300/);
    const report = JSON.parse(text);
    expect(report.thdPercent).toBeNull();
    expect(report.gainDb).toBeNull();
    expect(report.harmonics.every((h: { dbc: number | null }) => h.dbc === null)).toBe(true);
    expect(result.stdout).toMatch(/THD\s+n\/a/);
  });

  it('refuses a --source it cannot read, with one line naming the flag', () => {
    for (const bad of ['10k+3H+2', 'pickups', '-5k', '10k+3F']) {
      const result = runCli(['measure', design, '--source', bad]);
      expect(result.status).toBe(2);
      expect(result.stderr.trim().split('\n')).toHaveLength(1);
      expect(result.stderr).toMatch(/--source/);
    }
  });

  it('refuses a test frequency outside the audio band', () => {
    const result = runCli(['measure', design, '--freq', '30000']);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/--freq/);
  });
});
