import { describe, expect, test } from 'vitest';
import { taperFraction } from '../../src/design/taper.js';
import { resistanceRange, resolveDesign, resolveResistance } from '../../src/design/resolve.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { readDesignFile } from '../../src/design/parseDesign.js';
import type { GainStage, Pot, ToneStage } from '../../src/design/types.js';
import { expectClose } from '../helpers/expectClose.js';

describe('taperFraction', () => {
  test('linear is the position', () => {
    for (const p of [0, 0.25, 0.5, 1]) expect(taperFraction('linear', p)).toBe(p);
  });

  test('audio: 0 and 1 at the ends, 10 % at mid rotation (common practice: 10-15 % at mid rotation)', () => {
    expect(taperFraction('audio', 0)).toBe(0);
    expect(taperFraction('audio', 1)).toBe(1);
    expectClose(taperFraction('audio', 0.5), 0.1, { atol: 1e-15 });
    // monotonic rising
    let previous = -1;
    for (let p = 0; p <= 1; p += 0.05) {
      const fraction = taperFraction('audio', p);
      expect(fraction).toBeGreaterThan(previous);
      previous = fraction;
    }
  });
});

describe('resolve', () => {
  const pot: Pot = { fixedOhms: 10e3, potOhms: 500e3, knob: 'drive', taper: 'audio', reverse: false };

  test('R = fixed + pot x taper(position); reverse uses 1 - position', () => {
    expectClose(resolveResistance(pot, { drive: 0.5 }), 10e3 + 500e3 * 0.1, { rtol: 1e-12 });
    expectClose(resolveResistance({ ...pot, taper: 'linear', reverse: true }, { drive: 0.25 }), 10e3 + 500e3 * 0.75, { rtol: 1e-12 });
    expect(resolveResistance(4700, {})).toBe(4700);
    expect(resistanceRange(pot)).toEqual({ minOhms: 10e3, maxOhms: 510e3 });
    expect(resistanceRange(2200)).toEqual({ minOhms: 2200, maxOhms: 2200 });
  });

  test('resolveDesign turns every pot into ohms at the design knobs', async () => {
    const design = await readDesignFile('fixtures/designs/night-drive.json', loadPartsLibrary());
    const resolved = resolveDesign(design);
    // drive 0.6 on an audio 470k pot: 12k + 470k (81^0.6 - 1)/80
    expectClose((resolved.stages[1] as GainStage<number>).rf, 12e3 + (470e3 * (Math.pow(81, 0.6) - 1)) / 80, { rtol: 1e-12 });
    // tone 0.5 on a linear 20k pot plus 1k
    expectClose((resolved.stages[3] as ToneStage<number>).r, 11e3, { rtol: 1e-12 });
  });
});
