import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { runCli } from '../helpers/cli.js';
import { makeTempDir, NIGHT_DRIVE, writeDemoTake } from '../compare/compareFixtures.js';

let dir: string;
let take: string;

beforeAll(async () => {
  dir = makeTempDir('compare-cli');
  take = await writeDemoTake(dir, 'take.wav', 1);
});

describe('clipbench compare', () => {
  it('renders the matrix, prints the table and the page, reports the ceiling, exits 0', () => {
    const out = path.join(dir, 'out');
    const result = runCli(['compare', NIGHT_DRIVE, take, '--vary', 'clip.diode=1n4148,1n34a', '-o', out, '--oversample', '2', '--threads', '2']);
    expect(result.stderr).not.toMatch(/internal error/);
    expect(result.status).toBe(0);
    expect(result.stdout).toContain('1. clip.diode=1n4148');
    expect(result.stdout).toContain(`Listening page: ${path.join(out, 'index.html')}`);
    // The dry pluck's crest factor keeps it under -18 LUFS at a -1 dBFS peak: said on stderr.
    expect(result.stderr).toMatch(/ceiling: take--dry\.wav: held by the -1 dBFS peak ceiling/);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.loudnessMatch).toEqual({ targetLufs: -18, ceilingDbfs: -1 });
    expect(summary.takes[0].entries).toHaveLength(3);
    expect(existsSync(path.join(out, 'take--v02-clip.diode_1n34a.wav'))).toBe(true);
    // The ceiling held the dry take below the target: every player is matched to that quieter level
    // instead, within a tenth of a loudness unit (ITU-R BS.1770-4 integrated loudness of each file).
    const first = summary.takes[0];
    expect(first.matchedLufs).toBeLessThan(-18);
    for (const entry of first.entries) expect(Math.abs(entry.loudnessLufs - first.matchedLufs)).toBeLessThanOrEqual(0.1);
    expect(result.stdout).toMatch(/LUFS after/);
    expect(result.stderr).toMatch(/every player matched to -\d+\.\d LUFS, the quietest/);
  });

  it('a bad value in a variants file names the file and entry, not --set', () => {
    const variantsPath = path.join(dir, 'bad-value.json');
    writeFileSync(variantsPath, JSON.stringify({ variants: [{ label: 'a', set: { drive: 0.2 } }, { label: 'b', set: { 'clip.series': '2.2kk' } }] }));
    const result = runCli(['compare', NIGHT_DRIVE, take, '--variants', variantsPath, '-o', path.join(dir, 'bad-value-out'), '--oversample', '1']);
    expect(result.stderr).toContain(`variant 2 "b": ${variantsPath}: variants[1].set.clip.series: "2.2kk" is not a resistance`);
    expect(result.stderr).not.toMatch(/--set clip\.series/);
  });

  it('refuses a --variants file inside -o that an output would overwrite, and leaves it as it was', () => {
    const out = path.join(dir, 'variants-inside');
    mkdirSync(out);
    const variantsPath = path.join(out, 'summary.json');
    const text = JSON.stringify({ variants: [{ label: 'a', set: { drive: 0.2 } }, { label: 'b', set: { drive: 0.8 } }] });
    writeFileSync(variantsPath, text);
    const result = runCli(['compare', NIGHT_DRIVE, take, '--variants', variantsPath, '-o', out, '--oversample', '2']);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/refusing to overwrite the input file/);
    expect(readFileSync(variantsPath, 'utf8')).toBe(text);
  });

  it('refuses a second run into a folder another live run holds, and takes over a stale lock', () => {
    const out = path.join(dir, 'locked');
    mkdirSync(out);
    const lock = path.join(out, '.clipbench.lock');
    writeFileSync(lock, `${process.pid}\n`); // this test process is alive: it stands for the other run
    const refused = runCli(['compare', NIGHT_DRIVE, take, '--vary', 'drive=0.2,0.8', '-o', out, '--oversample', '2']);
    expect(refused.status).not.toBe(0);
    expect(refused.stderr.trim().split('\n')).toHaveLength(1);
    expect(refused.stderr).toMatch(/another clipbench run \(process \d+\) is writing into this folder/);
    expect(existsSync(path.join(out, 'summary.json'))).toBe(false);
    const ended = spawnSync(process.execPath, ['-e', '']).pid as number;
    writeFileSync(lock, `${ended}\n`);
    const taken = runCli(['compare', NIGHT_DRIVE, take, '--vary', 'drive=0.2,0.8', '-o', out, '--oversample', '2']);
    expect(taken.status).toBe(0);
    expect(existsSync(lock)).toBe(false);
  });

  it('warns when --threads asks for more threads than cores, finishes and exits', () => {
    const out = path.join(dir, 'many-threads');
    const result = runCli(['compare', NIGHT_DRIVE, take, '--vary', 'drive=0.1,0.3,0.5,0.7,0.9', '-o', out, '--oversample', '1', '--threads', '64']);
    expect(result.status).toBe(0);
    expect(result.stderr).toMatch(/warning: --threads 64 is more than this machine's \d+ cores/);
    expect(existsSync(path.join(out, 'index.html'))).toBe(true);
  });

  it('keeps the circuit level with --no-match (gain 0, loudness as rendered)', () => {
    const out = path.join(dir, 'raw');
    const result = runCli(['compare', NIGHT_DRIVE, take, '--vary', 'drive=0.1,0.9', '-o', out, '--oversample', '2', '--no-match']);
    expect(result.status).toBe(0);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.loudnessMatch).toBeNull();
    for (const entry of summary.takes[0].entries) {
      expect(entry.gainDb).toBe(0);
      expect(entry.loudnessBeforeLufs).toBe(entry.loudnessLufs);
    }
    const [, low, high] = summary.takes[0].entries;
    expect(high.loudnessLufs).toBeGreaterThan(low.loudnessLufs);
  });

  it('exits non-zero when every variant fails, naming each failure', () => {
    const result = runCli(['compare', NIGHT_DRIVE, take, '--vary', 'clip.diode=nope1,nope2', '-o', path.join(dir, 'bad'), '--oversample', '2']);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/failed: variant 1 "clip.diode=nope1": .*unknown diode "nope1"/);
    expect(result.stderr).toMatch(/every variant failed/);
  });

  it('refuses bad inputs with one line', () => {
    const missing = runCli(['compare', NIGHT_DRIVE, path.join(dir, 'missing.wav'), '--vary', 'drive=0.2,0.8', '-o', path.join(dir, 'x1')]);
    expect(missing.status).toBe(2);
    expect(missing.stderr.trim().split('\n')).toEqual([`clipbench: ${path.join(dir, 'missing.wav')}: file not found`]);
    const noVary = runCli(['compare', NIGHT_DRIVE, take, '-o', path.join(dir, 'x2')]);
    expect(noVary.status).toBe(2);
    expect(noVary.stderr).toMatch(/give --vary/);
    const loud = runCli(['compare', NIGHT_DRIVE, take, '--vary', 'drive=0.2,0.8', '--loudness', 'loud', '-o', path.join(dir, 'x3')]);
    expect(loud.status).toBe(2);
    expect(loud.stderr).toMatch(/--loudness: "loud" is not a loudness/);
  });
});
