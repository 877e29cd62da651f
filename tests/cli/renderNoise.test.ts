// render --noise adds the circuit's modelled output noise (measure's noise analysis with the input
// driven by the take), seeded: on a silent take the render's RMS is the density's integral to fs/2
// (Parseval), the sidecar says what was added, the same seed gives the same file, and without the flag
// silence stays silence.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readWavFile } from '../../src/audio/wavRead.js';
import { writeWavFile } from '../../src/audio/wavWrite.js';
import { designNoise } from '../../src/analysis/designNoise.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { readDesignFile } from '../../src/design/parseDesign.js';
import { resolveDesign } from '../../src/design/resolve.js';
import { interpolatedDensity } from '../../src/dsp/shapedNoise.js';
import { expectClose } from '../helpers/expectClose.js';
import { PROJECT_ROOT, runCli } from '../helpers/cli.js';

const design = path.join(PROJECT_ROOT, 'fixtures', 'designs', 'soft-harbor.json');
const RATE = 48000;

describe('render --noise', async () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-noise-'));
  const take = path.join(dir, 'silence.wav');
  await writeWavFile(take, [new Float32Array(4 * RATE)], RATE, '32f', false);
  const render = (out: string, ...flags: string[]) => {
    const result = runCli(['render', design, take, '-o', path.join(dir, out), '--bits', '32f', '--oversample', '2', ...flags]);
    expect(result.stderr).not.toMatch(/clipbench:|Error/);
    expect(result.status).toBe(0);
    return path.join(dir, out, 'silence--soft-harbor');
  };

  it('adds noise at the modelled level, says so in the sidecar, and repeats with the same seed', async () => {
    const stem = render('a', '--noise');
    const wav = await readWavFile(`${stem}.wav`);
    const samples = wav.channels[0];
    let sum = 0;
    for (let n = RATE; n < samples.length; n++) sum += samples[n] ** 2; // after the coupling caps settle
    const rms = Math.sqrt(sum / (samples.length - RATE));
    const report = designNoise(resolveDesign(await readDesignFile(design, loadPartsLibrary())), { source: null, sourceLabel: 'the take', referenceVolts: 0 });
    const density = interpolatedDensity(report.densityPerHz.map((p) => ({ hz: p.hz, density: p.voltsPerRootHz ** 2 })));
    let integral = 0;
    for (let hz = 0.5; hz < RATE / 2; hz += 1) integral += density(hz);
    expectClose(rms, Math.sqrt(integral), { rtol: 0.05 }); // full scale = 1 V
    const sidecar = JSON.parse(readFileSync(`${stem}.json`, 'utf8'));
    expect(sidecar.noise).toEqual({ seed: 1, unweightedDbv: report.unweightedDbv, aWeightedDbv: report.aWeightedDbv });
    expect(readFileSync(`${render('b', '--noise')}.wav`)).toEqual(readFileSync(`${stem}.wav`));
    expect(readFileSync(`${render('c', '--noise', '--noise-seed', '2')}.wav`)).not.toEqual(readFileSync(`${stem}.wav`));
  });

  it('without --noise a silent take renders silent', async () => {
    const wav = await readWavFile(`${render('quiet')}.wav`);
    expect(wav.channels[0].every((x) => x === 0)).toBe(true);
  });

  it('refuses a seed that is not a whole number', () => {
    const result = runCli(['render', design, take, '-o', path.join(dir, 'bad'), '--noise', '--noise-seed', '1.5']);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/^clipbench: --noise-seed: "1.5" is not a seed/);
  });
});
