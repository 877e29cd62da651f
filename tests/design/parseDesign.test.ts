import { readdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { parseDesignText, readDesignFile } from '../../src/design/parseDesign.js';
import type { ClipperStage, GainStage, InputStage, ToneStage, VolumeStage } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';

const parts = loadPartsLibrary();
const DESIGNS_DIR = path.resolve('fixtures/designs');

/** A small valid design; tests change one thing at a time. */
function baseDesign(): Record<string, unknown> {
  return {
    name: 'base',
    supply: 9,
    knobs: { drive: 0.6 },
    stages: [
      { id: 'in', type: 'input', coupling: '100n', pulldown: '1M' },
      { id: 'amp', type: 'gain', opamp: 'tl072', rg: '4k7', rf: { fixed: '10k', pot: '500k', knob: 'drive', taper: 'audio' } },
      { id: 'clip', type: 'clipper', series: '2k2', diode: '1n4148' },
    ],
  };
}

function parse(design: unknown, overrides: string[] = []) {
  return parseDesignText(JSON.stringify(design, null, 2), 'design.json', parts, overrides);
}

function withStage(index: number, changes: Record<string, unknown>): Record<string, unknown> {
  const design = baseDesign();
  const stages = design.stages as Record<string, unknown>[];
  stages[index] = { ...stages[index], ...changes };
  return design;
}

function errorOf(action: () => unknown): string {
  try {
    action();
  } catch (error) {
    expect(error).toBeInstanceOf(UserError);
    return (error as UserError).message;
  }
  throw new Error('expected a UserError');
}

describe('night-drive.json (the issue 2 example)', () => {
  test('parses into the typed design with every value in SI units', async () => {
    const design = await readDesignFile(path.join(DESIGNS_DIR, 'night-drive.json'), parts);
    expect(design.name).toBe('night-drive');
    expect(design.supplyVolts).toBe(9);
    expect(design.temperatureC).toBe(25);
    expect(design.knobs).toEqual({ drive: 0.6, tone: 0.5, level: 0.7 });
    const [input, amp, clip, tone, out] = design.stages as [InputStage, GainStage, ClipperStage, ToneStage, VolumeStage];
    expect(input).toEqual({ id: 'in', type: 'input', series: 1000, coupling: 1e-7, pulldown: 1e6 });
    expect(amp.opamp.name).toBe('tl072');
    expect(amp.rf).toEqual({ fixedOhms: 12e3, potOhms: 470e3, knob: 'drive', taper: 'audio', reverse: false });
    expect([amp.rg, amp.cg, amp.cf, amp.feedbackDiode]).toEqual([3900, 68e-9, 100e-12, null]);
    expect(clip.diode.name).toBe('1n4148');
    expect(clip.downDiode).toBe(clip.diode);
    expect([clip.series, clip.cap, clip.up, clip.down]).toEqual([2200, 10e-9, 1, 1]);
    expect(tone.r).toEqual({ fixedOhms: 1000, potOhms: 20e3, knob: 'tone', taper: 'linear', reverse: false });
    expect(tone.cap).toBe(22e-9);
    expect(out).toEqual({ id: 'out', type: 'volume', potOhms: 100e3, knob: 'level', taper: 'audio', reverse: false });
  });

  test('every bundled example design is valid', async () => {
    const files = readdirSync(DESIGNS_DIR).filter((file) => file.endsWith('.json'));
    expect(files.length).toBeGreaterThanOrEqual(3);
    for (const file of files) await expect(readDesignFile(path.join(DESIGNS_DIR, file), parts)).resolves.toBeDefined();
  });
});

describe('defaults', () => {
  test('temperature 25 C, name from the file, unlisted knobs at 0.5, counts 1', () => {
    const design = baseDesign();
    delete design.name;
    delete design.knobs;
    const parsed = parseDesignText(JSON.stringify(design), 'dir/my-pedal.json', parts);
    expect(parsed.name).toBe('my-pedal');
    expect(parsed.temperatureC).toBe(25);
    expect(parsed.knobs).toEqual({ drive: 0.5 });
    const clip = parsed.stages[2] as ClipperStage;
    expect([clip.up, clip.down, clip.cap]).toEqual([1, 1, null]);
    expect((parsed.stages[0] as InputStage).series).toBe(0);
  });

  test('gain without rf and rg is a unity buffer', () => {
    const parsed = parse({ ...withStage(1, { rf: undefined, rg: undefined }), knobs: {} });
    expect(parsed.knobs).toEqual({});
    const amp = parsed.stages[1] as GainStage;
    expect([amp.rf, amp.rg]).toEqual([0, null]);
  });

  test('feedbackDiode defaults to one diode each way; inline diodes and downDiode', () => {
    const parsed = parse(
      withStage(1, { feedbackDiode: '1N914' }),
    );
    const amp = parsed.stages[1] as GainStage;
    expect(amp.feedbackDiode?.name).toBe('1n914');
    expect([amp.feedbackUp, amp.feedbackDown]).toEqual([1, 1]);
    const inline = parse(withStage(2, { diode: { saturationCurrent: '1u', ideality: 1.3, seriesResistance: 5 }, downDiode: 'led-red', down: 2 }));
    const clip = inline.stages[2] as ClipperStage;
    expect(clip.diode.saturationCurrent).toBe(1e-6);
    expect(clip.diode.ratedCurrent).toBe(Infinity);
    expect(clip.downDiode.name).toBe('led-red');
    expect(clip.down).toBe(2);
  });

  test('custom parts defined inline in the design', () => {
    const design = baseDesign();
    design.parts = { diodes: { 'my-si': { saturationCurrent: 3e-9, ideality: 1.8, seriesResistance: 1, ratedCurrent: '100m' } } };
    (design.stages as Record<string, unknown>[])[2]!.diode = 'my-si';
    expect((parse(design).stages[2] as ClipperStage).diode.ratedCurrent).toBe(0.1);
  });
});

describe('knobs and the pots that use them', () => {
  test('a listed knob no pot uses beside a pot knob that is not listed: both are named, either may be the typo', () => {
    const typo = withStage(1, { rf: { fixed: '10k', pot: '500k', knob: 'dirve' } });
    expect(errorOf(() => parse(typo))).toBe(
      'design.json: knobs.drive: knob "drive" is not used by any pot, and stages[1].rf.knob names knob "dirve", which is not in knobs: is one a typo of the other?',
    );
  });

  test('a pot on a knob the knobs object does not list is refused at the pot', () => {
    const undefinedKnob = withStage(1, { rf: { fixed: '10k', pot: '500k', knob: 'tone' } });
    expect(errorOf(() => parse({ ...undefinedKnob, knobs: {} }))).toBe(
      'design.json: stages[1].rf.knob: knob "tone" is not in knobs; give its position there, e.g. "knobs": { "tone": 0.5 }',
    );
  });

  test('without a knobs object every knob sits at 0.5, and --set of one knob keeps the others there', () => {
    const twoKnobs = baseDesign();
    delete twoKnobs.knobs;
    (twoKnobs.stages as unknown[]).push({ id: 'tone', type: 'tone', fixed: '1k', pot: '20k', knob: 'tone', cap: '22n' });
    expect({ ...parse(twoKnobs).knobs }).toEqual({ drive: 0.5, tone: 0.5 });
    expect({ ...parse(twoKnobs, ['drive=0.9']).knobs }).toEqual({ drive: 0.9, tone: 0.5 });
  });
});

describe('errors name path, value and expectation', () => {
  test('JSON syntax errors give line and column', () => {
    const text = '{\n  "supply": 9,\n  "stages": [\n    { "id": "in" "type": "input" }\n  ]\n}';
    expect(errorOf(() => parseDesignText(text, 'design.json', parts))).toBe(
      `design.json: JSON syntax error at line 4, column 18: expected ',' or '}' after the property value, found "\\""`,
    );
    expect(errorOf(() => parseDesignText('{ "supply": 9,', 'design.json', parts))).toMatch(/line 1, column 15.*end of file/);
    expect(errorOf(() => parseDesignText('', 'design.json', parts))).toMatch(/design.json: file is empty/);
  });

  test('a duplicate key is refused with its line and column (JSON.parse would keep only the last)', () => {
    const text = '{\n  "supply": 9,\n  "supply": 18,\n  "stages": []\n}';
    expect(errorOf(() => parseDesignText(text, 'design.json', parts))).toBe(
      'design.json: JSON refused at line 3, column 3: expected no duplicate key ("supply" appears twice in this object; JSON keeps only the last), found "\\""',
    );
  });

  test('runaway nesting is one line naming the design, not a stack overflow', () => {
    const text = `{"supply": 9, "deep": ${'['.repeat(100000)}${']'.repeat(100000)}}`;
    expect(errorOf(() => parseDesignText(text, 'design.json', parts))).toMatch(/^design\.json: JSON refused at line 1, column \d+: expected nesting no deeper than 64 levels/);
  });

  test('knobs may be named like Object members ("constructor", "__proto__")', () => {
    const design = baseDesign();
    const pot = (design.stages as Record<string, Record<string, unknown>>[])[1]!.rf!;
    pot.knob = 'constructor';
    design.knobs = { constructor: 0.25 };
    expect(parse(design).knobs.constructor).toBe(0.25);
    pot.knob = '__proto__';
    design.knobs = JSON.parse('{ "__proto__": 0.75 }') as Record<string, number>;
    expect(Object.getOwnPropertyDescriptor(parse(design).knobs, '__proto__')?.value).toBe(0.75);
  });

  test('bad value', () => {
    expect(errorOf(() => parse(withStage(2, { series: '2.2kk' })))).toBe(
      'design.json: stages[2].series: "2.2kk" is not a resistance (expected ohms, e.g. 4.7k, 4k7 or 4700)',
    );
    expect(errorOf(() => parse(withStage(0, { coupling: 0 })))).toMatch(/^design.json: stages\[0\].coupling: 0 is not a valid capacitance/);
    expect(errorOf(() => parse(withStage(0, { pulldown: '-1M' })))).toMatch(/^design.json: stages\[0\].pulldown: "-1M" is not a resistance/);
  });

  test('unknown stage type, field, part and knob come with a suggestion', () => {
    expect(errorOf(() => parse(withStage(2, { type: 'cliper' })))).toBe(
      'design.json: stages[2].type: unknown stage type "cliper" (did you mean "clipper"?)',
    );
    expect(errorOf(() => parse(withStage(2, { seires: '1k' })))).toBe(
      'design.json: stages[2].seires: unknown field "seires" in a clipper stage (did you mean "series"?)',
    );
    expect(errorOf(() => parse(withStage(2, { diode: '1n4184' })))).toBe(
      'design.json: stages[2].diode: unknown diode "1n4184" (did you mean "1n4148"?)',
    );
    expect(errorOf(() => parse(withStage(1, { opamp: 'tl027' })))).toBe(
      'design.json: stages[1].opamp: unknown op-amp "tl027" (did you mean "tl072"?)',
    );
    const design = baseDesign();
    design.knobs = { drvie: 0.5 };
    // Either name may be the typo: both are named (a knob no pot uses, beside a pot knob not listed).
    expect(errorOf(() => parse(design))).toBe(
      'design.json: knobs.drvie: knob "drvie" is not used by any pot, and stages[1].rf.knob names knob "drive", which is not in knobs: is one a typo of the other?',
    );
    const topLevel = { ...baseDesign(), suply: 9 };
    expect(errorOf(() => parse(topLevel))).toBe('design.json: suply: unknown field "suply" in the design (did you mean "supply"?)');
    expect(errorOf(() => parse(withStage(1, { rf: { fixed: '10k', pot: '500k', knob: 'drive', taper: 'log' } })))).toMatch(
      /^design.json: stages\[1\].rf.taper: "log" is not a pot taper/,
    );
  });

  test('physical ranges: knob 0..1, supply 3-48 V, temperature -40..125 C, counts 0..10', () => {
    expect(errorOf(() => parse({ ...baseDesign(), knobs: { drive: 1.2 } }))).toBe(
      'design.json: knobs.drive: 1.2 is out of range (expected a knob position from 0 to 1)',
    );
    expect(errorOf(() => parse({ ...baseDesign(), supply: 60 }))).toBe(
      'design.json: supply: 60 is out of range (expected a supply from 3 to 48 volts)',
    );
    expect(errorOf(() => parse({ ...baseDesign(), supply: '1.5V' }))).toMatch(/^design.json: supply: "1.5V" is out of range/);
    expect(errorOf(() => parse({ ...baseDesign(), temperature: 300 }))).toMatch(/^design.json: temperature: 300 is out of range/);
    expect(errorOf(() => parse(withStage(2, { up: 1.5 })))).toMatch(/^design.json: stages\[2\].up: 1.5 is not a diode count/);
    expect(errorOf(() => parse(withStage(2, { down: 11 })))).toMatch(/^design.json: stages\[2\].down: 11 is not a diode count/);
  });

  test('structure: duplicate ids, missing fields, inconsistent gain stages', () => {
    expect(errorOf(() => parse(withStage(2, { id: 'amp' })))).toBe(
      'design.json: stages[2].id: duplicate stage id "amp" (already used by stages[1])',
    );
    expect(errorOf(() => parse(withStage(0, { pulldown: undefined })))).toBe('design.json: stages[0]: stage "in" is missing its "pulldown" field');
    expect(errorOf(() => parse(withStage(1, { rg: undefined })))).toMatch(/stage "amp" has rf but no rg/);
    expect(errorOf(() => parse(withStage(1, { feedbackUp: 2 })))).toMatch(/feedbackUp\/feedbackDown but no feedbackDiode/);
    expect(errorOf(() => parse({ ...baseDesign(), stages: [] }))).toMatch(/^design.json: stages: expected a non-empty array/);
    const { supply: _ignored, ...noSupply } = baseDesign();
    expect(errorOf(() => parse(noSupply))).toBe('design.json: the design is missing its "supply" field');
    expect(errorOf(() => parse(withStage(1, { id: 'my.amp' })))).toMatch(/not a valid stage id/);
  });

  test('a file that cannot be read names the file', async () => {
    await expect(readDesignFile('fixtures/designs/no-such-design.json', parts)).rejects.toThrow(
      'fixtures/designs/no-such-design.json: cannot read design (file not found)',
    );
  });
});
