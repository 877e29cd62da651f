import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { applyOverrides } from '../../src/design/overrides.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import type { ClipperStage, GainStage } from '../../src/design/types.js';

const parts = loadPartsLibrary();
const FILE = 'fixtures/designs/night-drive.json';
const text = readFileSync(FILE, 'utf8');
const parseWith = (...overrides: string[]) => parseDesignText(text, FILE, parts, overrides);

describe('--set overrides', () => {
  test('knob=value sets the knob position (numeric text becomes a number)', () => {
    expect(parseWith('drive=0.8').knobs.drive).toBe(0.8);
  });

  test('stageId.field=value sets a stage field, validated like the file', () => {
    const design = parseWith('clip.diode=1n34a', 'clip.up=2', 'amp.rf.fixed=4k7');
    const clip = design.stages[2] as ClipperStage;
    expect(clip.diode.name).toBe('1n34a');
    expect(clip.up).toBe(2);
    expect((design.stages[1] as GainStage).rf).toMatchObject({ fixedOhms: 4700, potOhms: 470e3 });
  });

  test('clip.diode on a clipper with its own downDiode changes both sides, unless clip.downDiode is set too', () => {
    const asymmetric = text.replace('"diode": "1n4148"', '"diode": "1n4148", "downDiode": "1n34a"');
    expect(asymmetric).not.toBe(text);
    const parseAsymmetric = (...overrides: string[]) => parseDesignText(asymmetric, FILE, parts, overrides).stages[2] as ClipperStage;
    const both = parseAsymmetric('clip.diode=1n5817');
    expect([both.diode.name, both.downDiode?.name]).toEqual(['1n5817', '1n5817']);
    for (const order of [['clip.diode=1n5817', 'clip.downDiode=1n4148'], ['clip.downDiode=1n4148', 'clip.diode=1n5817']]) {
      const own = parseAsymmetric(...order);
      expect([own.diode.name, own.downDiode?.name]).toEqual(['1n5817', '1n4148']);
    }
  });

  test('replacing a pot by a fixed value drops its knob', () => {
    const design = parseWith('amp.rf=22k');
    expect((design.stages[1] as GainStage).rf).toBe(22000);
    expect(design.knobs).toEqual({ tone: 0.5, level: 0.7 });
    expect(() => parseWith('amp.rf=22k', 'drive=0.5')).toThrow(/--set drive: no knob "drive"/);
  });

  test('top-level supply and temperature', () => {
    const design = parseWith('supply=18', 'temperature=40');
    expect([design.supplyVolts, design.temperatureC]).toEqual([18, 40]);
  });

  test('errors name the --set option, with suggestions', () => {
    expect(() => parseWith('clip.diode=1n34x')).toThrow('--set clip.diode: unknown diode "1n34x" (did you mean "1n34a"?)');
    expect(() => parseWith('drive=1.5')).toThrow('--set drive: 1.5 is out of range (expected a knob position from 0 to 1)');
    expect(() => parseWith('drvie=0.5')).toThrow('--set drvie: no knob "drvie" in fixtures/designs/night-drive.json (did you mean "drive"?)');
    expect(() => parseWith('clp.up=2')).toThrow('--set clp.up: no stage "clp" in fixtures/designs/night-drive.json (did you mean "clip"?)');
    expect(() => parseWith('clip.seriess=1k')).toThrow('--set clip.seriess: unknown field "seriess" in a clipper stage (did you mean "series"?)');
    expect(() => parseWith('clip.series.fixed=1k')).toThrow(/--set clip.series.fixed: clip.series is not a pot/);
    expect(() => parseWith('clip.up=two')).toThrow(/--set clip.up: "two" is not a diode count/);
    expect(() => parseWith('drive')).toThrow(/--set drive: expected name=value/);
  });

  test('applyOverrides leaves its input untouched', () => {
    const raw = JSON.parse(text) as { knobs: Record<string, number> };
    const changed = applyOverrides(raw, ['drive=0.9'], FILE) as { knobs: Record<string, number> };
    expect(changed.knobs.drive).toBe(0.9);
    expect(raw.knobs.drive).toBe(0.6);
  });
});
