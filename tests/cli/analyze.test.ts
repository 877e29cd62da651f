import { mkdtemp, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Command } from 'commander';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { encodeWav } from '../../src/audio/wavWrite.js';
import { registerAnalyzeCommand } from '../../src/cli/analyze.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';

let folder: string;
beforeEach(async () => {
  folder = await mkdtemp(join(tmpdir(), 'clipbench-analyze-'));
});
afterEach(async () => {
  await rm(folder, { recursive: true, force: true });
});

async function runAnalyze(args: string[]): Promise<string> {
  let output = '';
  const program = new Command().exitOverride().configureOutput({ writeOut: (text) => (output += text) });
  registerAnalyzeCommand(program);
  await program.parseAsync(['analyze', ...args], { from: 'user' });
  return output;
}

/** A 440 Hz tone with a third harmonic at -26 dBc (5 % THD), 2 s, 48 kHz mono, 32-bit float. */
async function writeToneWav(name: string): Promise<string> {
  const sampleRate = 48000;
  const x = new Float32Array(2 * sampleRate);
  for (let n = 0; n < x.length; n++) {
    const t = n / sampleRate;
    x[n] = 0.5 * Math.sin(2 * Math.PI * 440 * t) + 0.025 * Math.sin(2 * Math.PI * 1320 * t);
  }
  const path = join(folder, name);
  await writeFile(path, encodeWav([x], sampleRate, '32f'));
  return path;
}

describe('clipbench analyze', () => {
  it('prints a summary and writes JSON with the documented keys, HTML and SVG plots', async () => {
    const wavPath = await writeToneWav('tone.wav');
    const jsonPath = join(folder, 'tone.json');
    const htmlPath = join(folder, 'tone.html');
    const output = await runAnalyze([wavPath, '--json', jsonPath, '--html', htmlPath]);
    expect(output).toContain('integrated loudness');
    expect(output).toContain('Steady tone detected');

    const json = JSON.parse(await readFile(jsonPath, 'utf8')) as Record<string, unknown>;
    for (const key of ['peakDbfs', 'rmsDbfs', 'truePeakDbfs', 'lufs', 'crestDb', 'fundamentalHz', 'thdPercent', 'thdnPercent', 'harmonics', 'spectrum']) {
      expect(json, key).toHaveProperty(key);
    }
    expectClose(json.fundamentalHz as number, 440, { atol: 0.01 });
    // THD = V3 / V1 = 0.025 / 0.5 = 5 % (definition, IEC 60268-3).
    expectClose(json.thdPercent as number, 5, { rtol: 0.005 });

    const html = await readFile(htmlPath, 'utf8');
    expect(html).toContain('<svg');
    expect((await readdir(folder)).sort()).toEqual(['tone-harmonics.svg', 'tone-spectrum.svg', 'tone.html', 'tone.json', 'tone.wav']);
  });

  it('escapes a hostile file name in the HTML report', async () => {
    const wavPath = await writeToneWav('<script>alert(1)<\\script>.wav');
    const htmlPath = join(folder, 'report.html');
    await runAnalyze([wavPath, '--html', htmlPath]);
    const html = await readFile(htmlPath, 'utf8');
    expect(html).not.toMatch(/<script/i);
    expect(html).toContain('&lt;script&gt;');
  });

  it('rejects a --fundamental that is not a positive number with a UserError naming the flag', async () => {
    const wavPath = await writeToneWav('tone.wav');
    await expect(runAnalyze([wavPath, '--fundamental', 'abc'])).rejects.toThrow(UserError);
    await expect(runAnalyze([wavPath, '--fundamental', 'abc'])).rejects.toThrow(/--fundamental/);
  });

  it('refuses to write the JSON over the input file', async () => {
    const wavPath = await writeToneWav('tone.wav');
    await expect(runAnalyze([wavPath, '--json', wavPath])).rejects.toThrow(UserError);
  });
});
