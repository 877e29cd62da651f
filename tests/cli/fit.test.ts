// clipbench fit on the command line: the JSON keys the issue names, the fitted design file (a valid
// design with the fitted value) and its render, and bad inputs refused with one line. The recording is
// made here by rendering the design with a known series resistor, delayed and scaled (the fit's
// accuracy against an independent solver is tested in tests/analysis/fitDesign.test.ts).
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { advance } from '../../src/analysis/alignTakes.js';
import { readWavFile } from '../../src/audio/wavRead.js';
import { writeWavFile } from '../../src/audio/wavWrite.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { readDesignFile } from '../../src/design/parseDesign.js';
import { expectClose } from '../helpers/expectClose.js';
import { PROJECT_ROOT, runCli } from '../helpers/cli.js';

const design = path.join(PROJECT_ROOT, 'fixtures', 'designs', 'night-drive.json');
const dry = path.join(PROJECT_ROOT, 'fixtures', 'takes', 'pluck-mono-44k1-16bit.wav');

describe('clipbench fit', async () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-fit-'));
  expect(runCli(['render', design, dry, '-o', path.join(dir, 'ref'), '--set', 'clip.series=3300', '--oversample', '2', '--bits', '32f']).status).toBe(0);
  const reference = await readWavFile(path.join(dir, 'ref', 'pluck-mono-44k1-16bit--night-drive.wav'));
  const wet = path.join(dir, 'wet.wav');
  await writeWavFile(wet, [Float32Array.from(advance(Float64Array.from(reference.channels[0]), -7.6).map((x) => 0.5 * x))], reference.sampleRate, '32f', false);

  it('writes the JSON keys, the fitted design file and its render; recovers the value, latency and gain', async () => {
    const json = path.join(dir, 'fit.json');
    const out = path.join(dir, 'out');
    const result = runCli(['fit', design, '--dry', dry, '--wet', wet, '--free', 'clip.series', '--oversample', '2', '--json', json, '-o', out]);
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/Error-to-signal ratio/);
    const report = JSON.parse(readFileSync(json, 'utf8'));
    for (const key of ['latencySamples', 'gainDb', 'esrBeforePercent', 'esrAfterPercent', 'fitted', 'residualByOctave']) expect(report, key).toHaveProperty(key);
    expect(Object.keys(report.fitted[0]).sort()).toEqual(['identifiable', 'initial', 'key', 'uncertainty', 'value']);
    expectClose(report.fitted[0].value, 3300, { rtol: 0.002 });
    expectClose(report.latencySamples, 7.6, { atol: 0.02 });
    expectClose(report.gainDb, 20 * Math.log10(0.5), { atol: 0.01 });
    const fitted = await readDesignFile(path.join(out, 'night-drive--fit.json'), loadPartsLibrary());
    const clip = fitted.stages.find((s) => s.id === 'clip');
    expect(clip?.type === 'clipper' && clip.series).toBe(report.fitted[0].value);
    expect(readFileSync(path.join(out, 'pluck-mono-44k1-16bit--night-drive--fit.wav')).length).toBeGreaterThan(1000);
    // The listening page: dry, recording, initial and fitted model; blind test preset recording against fitted.
    const page = readFileSync(path.join(out, 'index.html'), 'utf8');
    for (const file of ['--dry.wav', '--recording.wav', '--initial-model.wav', '--fitted-model.wav']) expect(page).toContain(`pluck-mono-44k1-16bit${file}`);
    expect(page).toMatch(/data-role="pick-1">[^]*?<option value="1" selected>1\. recording of the build/);
    expect(page).toMatch(/data-role="pick-2">[^]*?<option value="3" selected>3\. fitted model/);
  });

  it('refuses a key it cannot fit, bounds that exclude the value, and a recording at another rate, with one line', async () => {
    const other = path.join(dir, 'other-rate.wav');
    await writeWavFile(other, [new Float32Array(48000)], 48000, '32f', false);
    for (const [args, message] of [
      [['--free', 'clip.diode'], /^clipbench: --free clip\.diode: not a numeric value/],
      [['--free', 'clip.series=5000..9000'], /^clipbench: --free clip\.series=5000\.\.9000: the design's value 2200 lies outside the bounds/],
      [['--free', 'clip.series', '--wet', other], /^clipbench: .*other-rate\.wav: 48000 Hz, but the dry take is 44100 Hz/],
    ] as const) {
      const result = runCli(['fit', design, '--dry', dry, '--wet', wet, ...args]);
      expect(result.status).toBe(2);
      expect(result.stderr.trim().split('\n')).toHaveLength(1);
      expect(result.stderr).toMatch(message);
    }
  });
});
