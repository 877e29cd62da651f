import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { writeWavFile } from '../../src/audio/wavWrite.js';
import { readWavFile } from '../../src/audio/wavRead.js';
import { PROJECT_ROOT, runCli } from '../helpers/cli.js';

const design = path.join(PROJECT_ROOT, 'fixtures', 'designs', 'night-drive.json');
let dir: string;
let monoTake: string;
let stereoTake: string;

function sine(length: number, sampleRate: number, hz: number, amplitude: number): Float64Array {
  const out = new Float64Array(length);
  for (let n = 0; n < length; n++) out[n] = amplitude * Math.sin((2 * Math.PI * hz * n) / sampleRate);
  return out;
}

beforeAll(async () => {
  dir = mkdtempSync(path.join(tmpdir(), 'clipbench-render-'));
  monoTake = path.join(dir, 'mono.wav');
  stereoTake = path.join(dir, 'stereo.wav');
  await writeWavFile(monoTake, [sine(24000, 48000, 220, 0.3)], 48000, '24');
  await writeWavFile(stereoTake, [sine(22050, 44100, 330, 0.2), sine(22050, 44100, 440, 0.1)], 44100, '16');
});

describe('clipbench render', () => {
  it('writes a WAV with the input length, rate and channels plus a JSON sidecar', async () => {
    const out = path.join(dir, 'out1');
    const result = runCli(['render', design, monoTake, stereoTake, '-o', out, '--oversample', '2']);
    expect(result.stderr).not.toMatch(/internal error/);
    expect(result.status).toBe(0);
    const mono = await readWavFile(path.join(out, 'mono--night-drive.wav'));
    expect(mono.sampleRate).toBe(48000);
    expect(mono.frames).toBe(24000);
    expect(mono.channels.length).toBe(1);
    const stereo = await readWavFile(path.join(out, 'stereo--night-drive.wav'));
    expect(stereo.sampleRate).toBe(44100);
    expect(stereo.frames).toBe(22050);
    expect(stereo.channels.length).toBe(2);
    const sidecar = JSON.parse(readFileSync(path.join(out, 'mono--night-drive.json'), 'utf8'));
    // 0.3 of full scale at the default 1 V full scale (the documented calibration).
    expect(sidecar.input.peakVolts).toBeCloseTo(0.3, 3);
    expect(sidecar.output.peakVolts).toBeGreaterThan(0);
    expect(sidecar.conducting.clip).toBeGreaterThan(0);
    expect(sidecar).toHaveProperty('overs.count');
    expect(sidecar).toHaveProperty('output.crestDb');
    expect(readdirSync(out).filter((name) => name.endsWith('.tmp'))).toEqual([]);
  });

  it('keeps every render when two takes share a file name or a name in another script (no data loss)', () => {
    const day1 = path.join(dir, 'day1');
    const day2 = path.join(dir, 'day2');
    mkdirSync(day1);
    mkdirSync(day2);
    copyFileSync(monoTake, path.join(day1, 'take1.wav'));
    copyFileSync(stereoTake, path.join(day2, 'take1.wav'));
    copyFileSync(monoTake, path.join(day2, 'ギター.wav'));
    const out = path.join(dir, 'same-names');
    const result = runCli(['render', design, path.join(day1, 'take1.wav'), path.join(day2, 'take1.wav'), path.join(day2, 'ギター.wav'), '-o', out, '--oversample', '2']);
    expect(result.status).toBe(0);
    expect(readdirSync(out).filter((name) => name.endsWith('.wav')).sort()).toEqual(['take1--night-drive.wav', 'take1-2--night-drive.wav', 'ギター--night-drive.wav'].sort());
  });

  it('refuses to overwrite another take of the same command (an earlier render picked up by a glob)', () => {
    const folder = path.join(dir, 'glob');
    mkdirSync(folder);
    const takePath = path.join(folder, 'take.wav');
    copyFileSync(monoTake, takePath);
    expect(runCli(['render', design, takePath, '-o', folder, '--oversample', '2']).status).toBe(0);
    const earlier = path.join(folder, 'take--night-drive.wav');
    const before = readFileSync(earlier);
    const result = runCli(['render', design, takePath, earlier, '-o', folder, '--oversample', '2']);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/refusing to overwrite the input file/);
    expect(readFileSync(earlier).equals(before)).toBe(true);
  });

  it('a job whose sidecar cannot be written leaves no WAV behind and is reported', () => {
    const out = path.join(dir, 'sidecar-fails');
    mkdirSync(path.join(out, 'mono--night-drive.json'), { recursive: true }); // a folder holds the sidecar's name
    const result = runCli(['render', design, monoTake, stereoTake, '-o', out, '--oversample', '2']);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/mono--night-drive\.json: cannot write, a folder has that name/);
    expect(readdirSync(out).sort()).toEqual(['mono--night-drive.json', 'stereo--night-drive.json', 'stereo--night-drive.wav']);
  });

  it("the sidecar's output peakDbfs is the written file's peak, also when the circuit went over full scale", async () => {
    const out = path.join(dir, 'hot');
    const result = runCli(['render', design, monoTake, '-o', out, '--oversample', '2', '--set', 'level=1', '--full-scale', '0.05']);
    expect(result.status).toBe(0);
    const sidecar = JSON.parse(readFileSync(path.join(out, 'mono--night-drive.json'), 'utf8'));
    expect(sidecar.overs.count).toBeGreaterThan(0); // the circuit's level lies above full scale
    const written = await readWavFile(path.join(out, 'mono--night-drive.wav'));
    let peak = 0;
    for (const v of written.channels[0]) peak = Math.max(peak, Math.abs(v));
    expect(sidecar.output.peakDbfs).toBeCloseTo(20 * Math.log10(peak), 3);
    expect(sidecar.output.peakDbfs).toBeLessThanOrEqual(0);
  });

  it('shows progress up to 100 % and the hearing caution only when a render is louder than its take', () => {
    const quiet = runCli(['render', design, monoTake, '-o', path.join(dir, 'quiet'), '--oversample', '1', '--set', 'level=0.05']);
    expect(quiet.status).toBe(0);
    expect(quiet.stderr).toMatch(/rendering: 100%/);
    expect(quiet.stdout).not.toMatch(/Caution/);
    const loud = runCli(['render', design, monoTake, '-o', path.join(dir, 'loud'), '--oversample', '1', '--set', 'level=1']);
    expect(loud.stdout).toMatch(/Caution: a render is louder than its take/);
  });

  it('gives byte-identical files on repeated runs', () => {
    const a = path.join(dir, 'repeat-a');
    const b = path.join(dir, 'repeat-b');
    expect(runCli(['render', design, monoTake, '-o', a, '--oversample', '2']).status).toBe(0);
    expect(runCli(['render', design, monoTake, '-o', b, '--oversample', '2']).status).toBe(0);
    for (const name of ['mono--night-drive.wav', 'mono--night-drive.json']) {
      expect(readFileSync(path.join(a, name)).equals(readFileSync(path.join(b, name)))).toBe(true);
    }
  });

  it('applies --set overrides (more drive, more output)', () => {
    const low = path.join(dir, 'low');
    const high = path.join(dir, 'high');
    expect(runCli(['render', design, monoTake, '-o', low, '--oversample', '2', '--set', 'drive=0', '--set', 'level=1']).status).toBe(0);
    expect(runCli(['render', design, monoTake, '-o', high, '--oversample', '2', '--set', 'drive=1', '--set', 'level=1']).status).toBe(0);
    const rms = (file: string): number => JSON.parse(readFileSync(file, 'utf8')).output.rmsVolts;
    expect(rms(path.join(high, 'mono--night-drive.json'))).toBeGreaterThan(rms(path.join(low, 'mono--night-drive.json')));
  });

  it('refuses to overwrite an input and leaves it untouched', () => {
    // The sidecar of mono.wav rendered through "night-drive" is mono--night-drive.json: make that
    // the design file itself, in the output folder.
    const trap = path.join(dir, 'trap');
    mkdirSync(trap, { recursive: true });
    const victim = path.join(trap, 'mono--night-drive.json');
    copyFileSync(design, victim);
    const before = readFileSync(victim);
    const result = runCli(['render', victim, monoTake, '-o', trap, '--oversample', '2']);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/overwrite|input/i);
    expect(readFileSync(victim).equals(before)).toBe(true);
    expect(readdirSync(trap)).toEqual(['mono--night-drive.json']);
  });

  it('reports a missing take in one line without a stack trace and writes nothing', () => {
    const out = path.join(dir, 'missing');
    const result = runCli(['render', design, path.join(dir, 'nope.wav'), '-o', out]);
    expect(result.status).not.toBe(0);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
    expect(result.stderr).toMatch(/nope\.wav/);
    expect(result.stderr).not.toMatch(/\s+at\s/);
    expect(readdirSync(out)).toEqual([]);
  });

  it('names the flag for a bad override', () => {
    const result = runCli(['render', design, monoTake, '-o', path.join(dir, 'bad'), '--set', 'clip.diode=1n4149']);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/clip\.diode/);
    expect(result.stderr).toMatch(/1n4148/); // did-you-mean suggestion
  });

  it('rejects a bad --oversample value', () => {
    const result = runCli(['render', design, monoTake, '-o', path.join(dir, 'bad2'), '--oversample', '3']);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/--oversample/);
  });

  it('returns the input through a unity buffer design (24-bit round trip)', async () => {
    const bufferDesign = path.join(dir, 'buffer.json');
    writeFileSync(
      bufferDesign,
      JSON.stringify({ name: 'buffer', supply: 9, stages: [{ id: 'buf', type: 'gain', opamp: 'ideal' }] }),
    );
    const out = path.join(dir, 'unity');
    const result = runCli(['render', bufferDesign, monoTake, '-o', out]);
    expect(result.status).toBe(0);
    expect(result.stderr).not.toMatch(/clipbench:/);
    const input = await readWavFile(monoTake);
    const output = await readWavFile(path.join(out, 'mono--buffer.wav'));
    let err = 0;
    let ref = 0;
    for (let i = 2000; i < 22000; i++) {
      err += (output.channels[0][i] - input.channels[0][i]) ** 2;
      ref += input.channels[0][i] ** 2;
    }
    // Issue requirement: unity buffer null below -80 dB in band.
    expect(10 * Math.log10(err / ref)).toBeLessThan(-80);
  });
});
