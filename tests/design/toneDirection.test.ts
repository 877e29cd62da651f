// The tone knob turns as tone controls do (common practice): clockwise is brighter, i.e. the series
// resistance before the tone capacitor falls and the low-pass corner 1 / (2 pi R C) rises as the knob
// turns up; `"reverse": true` wires the pot the other way round.
import { describe, expect, test } from 'vitest';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import { resolveDesign } from '../../src/design/resolve.js';
import type { ToneStage } from '../../src/design/types.js';

const parts = loadPartsLibrary();

function toneOhms(position: number, reverse?: boolean): number {
  const design = {
    name: 'tone-direction',
    supply: 9,
    knobs: { tone: position },
    stages: [{ id: 'tone', type: 'tone', fixed: '1k', pot: '20k', knob: 'tone', cap: '22n', ...(reverse === undefined ? {} : { reverse }) }],
  };
  const resolved = resolveDesign(parseDesignText(JSON.stringify(design), 'tone.json', parts));
  return (resolved.stages[0] as ToneStage<number>).r;
}

describe('tone knob direction', () => {
  test('fully clockwise leaves only the fixed resistor (brightest); fully counter-clockwise adds the whole pot', () => {
    expect(toneOhms(1)).toBeCloseTo(1000, 6);
    expect(toneOhms(0)).toBeCloseTo(21000, 6);
  });

  test('the corner rises monotonically as the knob turns up', () => {
    const ohms = [0, 0.25, 0.5, 0.75, 1].map((p) => toneOhms(p));
    for (let k = 1; k < ohms.length; k++) expect(ohms[k]).toBeLessThan(ohms[k - 1]);
  });

  test('"reverse": true makes clockwise darker', () => {
    expect(toneOhms(1, true)).toBeCloseTo(21000, 6);
    expect(toneOhms(0, true)).toBeCloseTo(1000, 6);
  });
});
