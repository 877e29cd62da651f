/**
 * Bad input at the command line (issue 6 "Bad input, everywhere"), one test per class and command:
 * the process exits non-zero, writes exactly ONE line to stderr that names the file or flag and the
 * problem, shows no stack trace (unless --debug), and leaves nothing in the output folder (no
 * partial or *.tmp files). The messages themselves are tested at the unit level in tests/audio and
 * tests/design; here only what reaches the user through the real CLI (dist/cli/main.js).
 */
import { spawnSync } from 'node:child_process';
import { closeSync, copyFileSync, existsSync, openSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { encodeWav } from '../../src/audio/wavWrite.js';
import { float32Bytes, int16Bytes, simpleWav } from '../audio/wavBytes.js';
import { PROJECT_ROOT, runCliAsync, type CliResult } from '../helpers/cli.js';

const NIGHT_DRIVE = path.join(PROJECT_ROOT, 'fixtures', 'designs', 'night-drive.json');
const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-badinput-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const at = (name: string): string => path.join(dir, name);
let outCount = 0;
/** A fresh output folder path (not created). */
const freshOut = (): string => at(`out-${++outCount}`);

/**
 * The one-line failure contract. `outDir` (when given) must be missing or empty afterwards.
 * Each pattern must match the single stderr line.
 */
function expectOneLineFailure(result: CliResult, outDir: string | null, ...patterns: RegExp[]): string {
  expect(result.status, `exit status; stderr: ${result.stderr}`).not.toBe(0);
  expect(result.status).not.toBeNull();
  const lines = result.stderr.trimEnd().split('\n');
  expect(lines, 'exactly one stderr line').toHaveLength(1);
  const line = lines[0]!;
  expect(line).toMatch(/^clipbench: /);
  expect(line).not.toMatch(/internal error/);
  expect(result.stderr).not.toMatch(/^\s+at /m);
  for (const pattern of patterns) expect(line).toMatch(pattern);
  if (outDir !== null && existsSync(outDir)) expect(readdirSync(outDir), 'nothing left in the output folder').toEqual([]);
  return line;
}

const escape = (text: string): string => text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
/** The path as the message shows it. */
const named = (file: string): RegExp => new RegExp(escape(file));

// ---- WAV files -------------------------------------------------------------------------------
const SAMPLE_RATE = 48000;
function tone(frames: number): Float32Array {
  const x = new Float32Array(frames);
  for (let n = 0; n < frames; n++) x[n] = 0.3 * Math.sin((2 * Math.PI * 440 * n) / SAMPLE_RATE);
  return x;
}

const BAD_WAVS: { name: string; problem: RegExp; bytes: () => Uint8Array | string }[] = [
  {
    name: 'truncated.wav',
    problem: /truncated|cut short|ends/i,
    bytes: () => {
      const good = encodeWav([tone(4800)], SAMPLE_RATE, '24');
      return good.slice(0, 30); // the fmt chunk is cut off
    },
  },
  { name: 'empty.wav', problem: /empty/i, bytes: () => new Uint8Array(0) },
  { name: 'notes.wav', problem: /not a RIFF\/WAVE file/, bytes: () => 'these are my notes, not audio\n' },
  {
    // IEEE float (format tag 3) with a NaN at frame 2: written by hand, encodeWav refuses NaN.
    name: 'nan.wav',
    problem: /NaN/,
    bytes: () => simpleWav({ formatTag: 3, channels: 1, sampleRate: SAMPLE_RATE, bitsPerSample: 32 }, float32Bytes([0, 0.1, Number.NaN, 0.2])),
  },
  {
    name: 'quad.wav',
    problem: /4 channels/,
    bytes: () => simpleWav({ formatTag: 1, channels: 4, sampleRate: SAMPLE_RATE, bitsPerSample: 16 }, int16Bytes([1, 2, 3, 4, 5, 6, 7, 8])),
  },
  {
    name: 'absurd-rate.wav',
    problem: /3000000 Hz/,
    bytes: () => simpleWav({ formatTag: 1, channels: 1, sampleRate: 3_000_000, bitsPerSample: 16 }, int16Bytes([0, 100, -100, 0])),
  },
];

let goodTake: string;

beforeAll(() => {
  goodTake = at('good.wav');
  writeFileSync(goodTake, encodeWav([tone(9600)], SAMPLE_RATE, '24'));
  for (const wav of BAD_WAVS) writeFileSync(at(wav.name), wav.bytes());
});

// Every class through analyze; the render and compare paths (worker threads, one line per take)
// with a few of them (each CLI run costs about a second of start-up).
describe.concurrent.each(BAD_WAVS.map((wav) => [wav.name, wav] as const))('bad WAV %s', (_name, wav) => {
  test('analyze: one line naming the file and the problem, no JSON written', async () => {
    const json = at(`${wav.name}.json`);
    expectOneLineFailure(await runCliAsync(['analyze', at(wav.name), '--json', json]), null, named(at(wav.name)), wav.problem);
    expect(existsSync(json)).toBe(false);
  });
});

const badWav = (name: string) => BAD_WAVS.find((wav) => wav.name === name)!;

describe.concurrent('bad WAVs through render and compare', () => {
  test.each(['truncated.wav', 'nan.wav', 'absurd-rate.wav'])('render %s: one line naming the take, nothing written', async (name) => {
    const out = freshOut();
    expectOneLineFailure(await runCliAsync(['render', NIGHT_DRIVE, at(name), '-o', out, '--oversample', '2']), out, named(at(name)), badWav(name).problem);
  });

  test.each(['empty.wav', 'quad.wav'])('compare %s: one line naming the take, nothing written', async (name) => {
    const out = freshOut();
    expectOneLineFailure(await runCliAsync(['compare', NIGHT_DRIVE, at(name), '--vary', 'drive=0.2,0.8', '-o', out, '--oversample', '2']), out, named(at(name)), badWav(name).problem);
  });
});

// ---- design files ---------------------------------------------------------------------------
const nightDrive = (): { knobs: Record<string, number>; stages: Record<string, unknown>[]; [key: string]: unknown } =>
  JSON.parse(readFileSync(NIGHT_DRIVE, 'utf8'));

function designWith(edit: (design: ReturnType<typeof nightDrive>) => void): string {
  const design = nightDrive();
  edit(design);
  return JSON.stringify(design, null, 2);
}

const BAD_DESIGNS: { name: string; text: () => string; problem: RegExp[] }[] = [
  {
    name: 'syntax.json',
    text: () => '{\n  "supply": 9,\n  "stages": [\n    { "id": "in" "type": "input" }\n  ]\n}\n',
    problem: [/JSON syntax error/, /line 4, column 18/],
  },
  {
    name: 'unknown-type.json',
    text: () => designWith((d) => (d.stages[2]!.type = 'cliper')),
    problem: [/stages\[2\]\.type/, /unknown stage type "cliper"/, /did you mean "clipper"/],
  },
  {
    name: 'unknown-field.json',
    text: () => designWith((d) => (d.stages[1]!.feedbakDiode = '1n4148')),
    problem: [/stages\[1\]\.feedbakDiode/, /unknown field "feedbakDiode"/, /did you mean "feedbackDiode"/],
  },
  {
    name: 'unknown-part.json',
    text: () => designWith((d) => (d.stages[2]!.diode = '1n4184')),
    problem: [/stages\[2\]\.diode/, /unknown diode "1n4184"/, /did you mean "1n4148"/],
  },
  {
    name: 'unknown-knob.json',
    text: () => designWith((d) => (d.knobs = { drvie: 0.5 })),
    problem: [/knobs\.drvie/, /not used by any pot/, /stages\[\d\]\.rf\.knob names knob "drive"/, /typo/],
  },
  {
    name: 'zero-r.json',
    text: () => designWith((d) => (d.stages[2]!.series = 0)),
    problem: [/stages\[2\]\.series/, /0 is not a valid resistance|above zero|ohm/],
  },
  {
    name: 'negative-c.json',
    text: () => designWith((d) => (d.stages[0]!.coupling = '-100n')),
    problem: [/stages\[0\]\.coupling/, /"-100n"/, /capacitance|farad/],
  },
  {
    name: 'knob-range.json',
    text: () => designWith((d) => (d.knobs.drive = 1.5)),
    problem: [/knobs\.drive/, /1\.5 is out of range/, /0 to 1/],
  },
  {
    name: 'supply-range.json',
    text: () => designWith((d) => (d.supply = 60)),
    problem: [/supply/, /60 is out of range/, /3 to 48 volts/],
  },
];

beforeAll(() => {
  for (const design of BAD_DESIGNS) writeFileSync(at(design.name), design.text());
});

describe.concurrent.each(BAD_DESIGNS.map((design) => [design.name, design] as const))('bad design %s', (_name, design) => {
  test('check: one line naming the file, the JSON path and the problem', async () => {
    expectOneLineFailure(await runCliAsync(['check', at(design.name), '--json']), null, named(at(design.name)), ...design.problem);
  });
});

// The parser is shared: every class through check, one each through render, measure and compare.
describe.concurrent('bad designs through render, measure and compare', () => {
  const badDesign = (name: string) => BAD_DESIGNS.find((d) => d.name === name)!;

  test('render with a JSON syntax error: one line with line and column, nothing written', async () => {
    const out = freshOut();
    expectOneLineFailure(await runCliAsync(['render', at('syntax.json'), goodTake, '-o', out, '--oversample', '2']), out, named(at('syntax.json')), ...badDesign('syntax.json').problem);
  });

  test('measure with an unknown part: one line with the suggestion, no JSON written', async () => {
    const json = at('measure-unknown-part.json.out');
    expectOneLineFailure(await runCliAsync(['measure', at('unknown-part.json'), '--json', json]), null, named(at('unknown-part.json')), ...badDesign('unknown-part.json').problem);
    expect(existsSync(json)).toBe(false);
  });

  test('compare with a knob out of range: one line, nothing written', async () => {
    const out = freshOut();
    expectOneLineFailure(await runCliAsync(['compare', at('knob-range.json'), goodTake, '--vary', 'level=0.2,0.8', '-o', out, '--oversample', '2']), out, named(at('knob-range.json')), ...badDesign('knob-range.json').problem);
  });
});

// ---- option values ----------------------------------------------------------------------------
describe.concurrent('bad option values name the flag', () => {
  test.each([
    ['--oversample', '3', /--oversample: "3" is not one of 1, 2, 4, 8, 16/],
    ['--bits', '20', /--bits: "20" is not one of 16, 24, 32f/],
    ['--full-scale', '-1', /--full-scale: "-1" is not a positive number/],
    // Calibrations that would underflow to silence or overflow to NaN are refused with the range.
    ['--full-scale', '1e-320', /--full-scale: 1e-320 V is outside 0\.000001 to 1000 volts peak/],
    ['--full-scale', '1e308', /--full-scale: 1e308 V is outside/],
    ['--input-peak', '1e308', /--input-peak: 1e308 V is outside/],
  ])('render %s %s', async (flag, value, problem) => {
    const out = freshOut();
    expectOneLineFailure(await runCliAsync(['render', NIGHT_DRIVE, goodTake, '-o', out, flag, value]), out, problem);
  });

  test.each([['--bits', '8', /--bits: "8" is not one of 16, 24, 32f/]])('compare %s %s', async (flag, value, problem) => {
    const out = freshOut();
    expectOneLineFailure(await runCliAsync(['compare', NIGHT_DRIVE, goodTake, '--vary', 'drive=0.2,0.8', '-o', out, flag, value]), out, problem);
  });

  test.each([
    ['--level', '0', /--level: "0" is not a positive number/],
    ['--freq', '1e9', /--freq: .*outside the audio band/],
    ['--oversample', '32', /--oversample: "32"/],
  ])('measure %s %s', async (flag, value, problem) => {
    const json = at(`measure-flag-${flag}-${value}.json`);
    expectOneLineFailure(await runCliAsync(['measure', NIGHT_DRIVE, flag, value, '--json', json]), null, problem);
    expect(existsSync(json)).toBe(false);
  });

  test('check --input-peak', async () => {
    expectOneLineFailure(await runCliAsync(['check', NIGHT_DRIVE, '--input-peak', '-2']), null, /--input-peak/);
  });

  test('parts --kind bogus', async () => {
    expectOneLineFailure(await runCliAsync(['parts', '--kind', 'bogus']), null, /--kind: "bogus" is not one of diode, opamp/);
  });
});

// ---- usage errors and output folders that cannot be ------------------------------------------
describe.concurrent('usage errors and impossible output folders: one clipbench: line, exit 2', () => {
  test('missing -o', async () => {
    const result = await runCliAsync(['render', NIGHT_DRIVE, goodTake]);
    expectOneLineFailure(result, null, /required option '-o, --output <dir>' not specified/);
    expect(result.status).toBe(2);
  });

  test('unknown option', async () => {
    const out = freshOut();
    const result = await runCliAsync(['render', NIGHT_DRIVE, goodTake, '-o', out, '--bogus']);
    expectOneLineFailure(result, out, /unknown option '--bogus'/);
    expect(result.status).toBe(2);
  });

  test.each([
    ['an existing file', (): string => {
      const file = at('not-a-folder');
      writeFileSync(file, 'x');
      return file;
    }, /is not a folder \(a file has that name\)/],
    ['a path below a file', (): string => {
      const file = at('plain-file');
      writeFileSync(file, 'x');
      return path.join(file, 'renders');
    }, /a part of this path is a file/],
    ['/dev/null', (): string => '/dev/null', /\/dev\/null: is not a folder/],
  ])('-o at %s', async (_what, makeTarget, problem) => {
    const result = await runCliAsync(['render', NIGHT_DRIVE, goodTake, '-o', makeTarget(), '--oversample', '1']);
    expectOneLineFailure(result, null, problem);
    expect(result.status).toBe(2);
  });
});

describe('stdout that fails', () => {
  test('a full disk behind stdout (/dev/full) ends quietly with exit status 1', () => {
    if (!existsSync('/dev/full')) return; // Linux only
    const full = openSync('/dev/full', 'w');
    try {
      const result = spawnSync(process.execPath, [path.join(PROJECT_ROOT, 'dist', 'cli', 'main.js'), 'parts'], { stdio: ['ignore', full, 'pipe'], encoding: 'utf8' });
      expect(result.status).toBe(1);
      expect(result.stderr).toBe('');
    } finally {
      closeSync(full);
    }
  });
});

// ---- an output that is an input ---------------------------------------------------------------
describe.concurrent('an output path equal to an input is refused and the input is untouched', () => {
  function victimCopy(folder: string, name: string, source: string): { file: string; before: Buffer } {
    mkdirSync(folder, { recursive: true });
    const file = path.join(folder, name);
    copyFileSync(source, file);
    return { file, before: readFileSync(file) };
  }

  test('measure --json onto the design file', async () => {
    const { file, before } = victimCopy(at('measure-victim'), 'design.json', NIGHT_DRIVE);
    expectOneLineFailure(await runCliAsync(['measure', file, '--json', file]), null, named(file), /input|overwrite/i);
    expect(readFileSync(file).equals(before)).toBe(true);
  });

  test('analyze --json onto the WAV it reads', async () => {
    const { file, before } = victimCopy(at('analyze-victim'), 'take.wav', goodTake);
    expectOneLineFailure(await runCliAsync(['analyze', file, '--json', file]), null, named(file), /input|overwrite/i);
    expect(readFileSync(file).equals(before)).toBe(true);
  });

  test('compare whose summary.json would be the design file', async () => {
    const folder = at('compare-victim');
    const { file, before } = victimCopy(folder, 'summary.json', NIGHT_DRIVE);
    expectOneLineFailure(await runCliAsync(['compare', file, goodTake, '--vary', 'drive=0.2,0.8', '-o', folder, '--oversample', '2']), null, named(file), /input|overwrite/i);
    expect(readFileSync(file).equals(before)).toBe(true);
    expect(readdirSync(folder)).toEqual(['summary.json']);
  });
});

describe.concurrent('--debug', () => {
  test('adds the stack trace after the one-line message', async () => {
    const result = await runCliAsync(['check', at('unknown-part.json'), '--debug']);
    expect(result.status).not.toBe(0);
    const [first] = result.stderr.split('\n');
    expect(first).toMatch(/^clipbench: .*unknown diode "1n4184"/);
    expect(result.stderr).toMatch(/^\s+at /m);
  });
});
