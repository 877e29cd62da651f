/**
 * `railClipping: true` on a gain stage says clipping at the op-amp rails is intended: check then
 * keeps its facts but drops the `rails-before-diodes` warning for that stage only.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { checkDesign } from '../../src/analysis/designCheck.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import type { GainStage } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';

const parts = loadPartsLibrary();
// night-drive with three red LEDs in series each way: they clip above the TL072's 3 V swing on 9 V, so
// the rails come first at full drive (see designCheck.test.ts).
const NIGHT_DRIVE = readFileSync('fixtures/designs/night-drive.json', 'utf8').replace('"diode": "1n4148", "up": 1, "down": 1', '"diode": "led-red", "up": 3, "down": 3');

function check(text: string, overrides: string[] = []) {
  const design = parseDesignText(text, 'night-drive.json', parts, overrides);
  return { design, result: checkDesign(design, { inputPeakVolts: 1 }) };
}

/** The rails-before-diodes warnings (three LEDs also never conduct at these levels: another warning). */
const codes = (warnings: { stage: string; code: string }[]): string[] => warnings.filter((w) => w.code === 'rails-before-diodes').map((w) => `${w.stage}:${w.code}`);

describe('gain stage railClipping', () => {
  test('absent: parsed as false, and the LED variant warns (1 V x 125 at full drive >> the TL072 3 V swing, below the LEDs)', () => {
    expect(NIGHT_DRIVE).toContain('led-red');
    const { design, result } = check(NIGHT_DRIVE);
    expect((design.stages[1] as GainStage).railClipping).toBe(false);
    expect(codes(result.warnings)).toEqual(['amp:rails-before-diodes']);
  });

  test('true (in the file or by --set): the warning goes, every fact stays', () => {
    const raw = JSON.parse(NIGHT_DRIVE) as { stages: Record<string, unknown>[] };
    raw.stages[1]!.railClipping = true;
    const inFile = check(JSON.stringify(raw));
    const bySet = check(NIGHT_DRIVE, ['amp.railClipping=true']);
    const plain = check(NIGHT_DRIVE);
    expect((inFile.design.stages[1] as GainStage).railClipping).toBe(true);
    expect(codes(inFile.result.warnings)).toEqual([]);
    expect(codes(bySet.result.warnings)).toEqual([]);
    expect(inFile.result.facts).toEqual(plain.result.facts);
  });

  test('only the marked stage is silenced: a second gain stage still warns', () => {
    const design = {
      supply: 9,
      stages: [
        { id: 'in', type: 'input', coupling: '100n', pulldown: '1M' },
        { id: 'a', type: 'gain', opamp: 'tl072', rf: '100k', rg: '10k', railClipping: true },
        { id: 'b', type: 'gain', opamp: 'tl072', rf: '100k', rg: '10k' },
        { id: 'clip', type: 'clipper', series: '1k', diode: 'led-red', up: 3, down: 3 },
      ],
    };
    // a: 1 V x 11 = 11 V > 3 V (intended); b: the 3 V it gets x 11 = 33 V > 3 V, below the LEDs (warned)
    expect(codes(check(JSON.stringify(design)).result.warnings)).toEqual(['b:rails-before-diodes']);
  });

  test('a value other than true/false, or the field on another stage type, is a UserError naming the path', () => {
    const raw = JSON.parse(NIGHT_DRIVE) as { stages: Record<string, unknown>[] };
    raw.stages[1]!.railClipping = 'yes';
    expect(() => check(JSON.stringify(raw))).toThrow(UserError);
    expect(() => check(JSON.stringify(raw))).toThrow('night-drive.json: stages[1].railClipping: expected true or false, found "yes"');
    const onClipper = JSON.parse(NIGHT_DRIVE) as { stages: Record<string, unknown>[] };
    onClipper.stages[2]!.railClipping = true;
    expect(() => check(JSON.stringify(onClipper))).toThrow(/stages\[2\]\.railClipping: unknown field "railClipping" in a clipper stage/);
  });
});
