import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadPartsLibrary } from '../../src/design/parts.js';
import type { DiodeParams } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';

// Thermal voltage kT/q at 25 C with the exact SI 2019 constants k = 1.380649e-23 J/K, q = 1.602176634e-19 C.
const THERMAL_VOLTS_25C = (1.380649e-23 * 298.15) / 1.602176634e-19;

/** Shockley diode with ohmic series resistance, solved for voltage: Vf = n Vt ln(I/Is + 1) + I Rs. */
function forwardVolts(diode: DiodeParams, amps: number): number {
  return diode.ideality * THERMAL_VOLTS_25C * Math.log(amps / diode.saturationCurrent + 1) + amps * diode.seriesResistance;
}

function writeTemp(name: string, text: string): string {
  const dir = mkdtempSync(path.join(tmpdir(), 'clipbench-parts-'));
  const file = path.join(dir, name);
  writeFileSync(file, text);
  return file;
}

const library = loadPartsLibrary();

describe('bundled parts library', () => {
  test('holds every part the issue lists', () => {
    for (const name of ['1n4148', '1n914', '1n34a', '1n60', '1n5817', 'bat41', 'led-red', 'led-green', 'led-blue']) {
      expect(library.diodes.get(name)?.source.length, name).toBeGreaterThan(20);
    }
    for (const name of ['ideal', 'tl072', 'ne5532', 'rc4558', 'lm741', 'lm358', 'tlv2372']) {
      expect(library.opamps.get(name)?.source.length, name).toBeGreaterThan(20);
    }
  });

  test('1N4148 model meets the datasheet limit VF <= 1.0 V at 10 mA', () => {
    const vf = forwardVolts(library.diodes.get('1n4148')!, 10e-3);
    expect(vf).toBeLessThanOrEqual(1.0); // datasheet limit
    expectClose(vf, 0.69, { atol: 0.01 }); // manufacturer model card: Vf 0.694 V at 10 mA (Vt 25.85 mV)
  });

  test('1N914 model meets VF <= 1.0 V at 10 mA (datasheet)', () => {
    expect(forwardVolts(library.diodes.get('1n914')!, 10e-3)).toBeLessThanOrEqual(1.0);
  });

  test('1N5817 model meets VF <= 0.45 V at 1 A and <= 0.75 V at 3 A (datasheet)', () => {
    const diode = library.diodes.get('1n5817')!;
    expect(forwardVolts(diode, 1)).toBeLessThanOrEqual(0.45);
    expect(forwardVolts(diode, 3)).toBeLessThanOrEqual(0.75);
  });

  test('BAT41 fit: 400 mV typ (450 max) at 1 mA, <= 1 V at 200 mA (datasheet)', () => {
    const diode = library.diodes.get('bat41')!;
    expectClose(forwardVolts(diode, 1e-3), 0.4, { atol: 0.01 });
    expect(forwardVolts(diode, 1e-3)).toBeLessThanOrEqual(0.45);
    expect(forwardVolts(diode, 0.2)).toBeLessThanOrEqual(1.0);
  });

  test('germanium parts drop well under silicon (common practice: about 0.2-0.35 V at 1 mA)', () => {
    for (const name of ['1n34a', '1n60']) {
      const vf = forwardVolts(library.diodes.get(name)!, 1e-3);
      expect(vf, name).toBeGreaterThan(0.15);
      expect(vf, name).toBeLessThan(0.35);
    }
  });

  test('LEDs: red < green < blue forward drop at 20 mA (generic LED model cards: 1.85, 2.29, 3.71 V)', () => {
    const drops = ['led-red', 'led-green', 'led-blue'].map((name) => forwardVolts(library.diodes.get(name)!, 20e-3));
    expectClose(drops[0]!, 1.85, { atol: 0.03 });
    expectClose(drops[1]!, 2.29, { atol: 0.03 });
    expectClose(drops[2]!, 3.71, { atol: 0.04 });
  });

  test('TL072 headroom from the datasheet swing line: +-13.5 V at +-15 V', () => {
    const tl072 = library.opamps.get('tl072')!;
    expect(15 - tl072.headroomHighVolts).toBe(13.5);
    expect(-15 + tl072.headroomLowVolts).toBe(-13.5);
    expect(tl072.gbwHz).toBe(4e6); // datasheet 4 MHz typ
    expect(tl072.slewRateVoltsPerSecond).toBe(16e6); // datasheet 16 V/us typ
  });

  test('LM358 supply range 3-32 V (datasheet)', () => {
    const lm358 = library.opamps.get('lm358')!;
    expect([lm358.supplyMinVolts, lm358.supplyMaxVolts]).toEqual([3, 32]);
  });

  test('the ideal op-amp has unlimited GBW and slew and no headroom ("inf" in JSON)', () => {
    const ideal = library.opamps.get('ideal')!;
    expect(ideal.gbwHz).toBe(Infinity);
    expect(ideal.slewRateVoltsPerSecond).toBe(Infinity);
    expect(ideal.headroomLowVolts + ideal.headroomHighVolts).toBe(0);
  });
});

describe('extra parts file', () => {
  test('adds and overrides parts; names are case-insensitive', () => {
    const file = writeTemp(
      'my-parts.json',
      JSON.stringify({
        diodes: { 'MY-GE': { saturationCurrent: '1u', ideality: 1.4, seriesResistance: '10' } },
        opamps: { TL072: { gbwHz: '3M', slewRateVoltsPerSecond: '13M', headroomLowVolts: 2, headroomHighVolts: 2, supplyMinVolts: 7, supplyMaxVolts: 36 } },
      }),
    );
    const extended = loadPartsLibrary(file);
    expect(extended.diodes.get('my-ge')?.saturationCurrent).toBe(1e-6);
    expect(extended.diodes.get('my-ge')?.source).toContain('my-parts.json');
    expect(extended.opamps.get('tl072')?.gbwHz).toBe(3e6);
    expect(extended.diodes.get('1n4148')).toBeDefined();
  });

  test('errors name the file and JSON path', () => {
    const file = writeTemp('bad-parts.json', JSON.stringify({ diodes: { x: { saturationCurrent: '1uu', ideality: 1, seriesResistance: 1 } } }));
    expect(() => loadPartsLibrary(file)).toThrow(`${file}: diodes.x.saturationCurrent: "1uu" is not a current`);
    const typo = writeTemp('typo.json', JSON.stringify({ diodes: { x: { saturationCurent: 1e-9, ideality: 1, seriesResistance: 1 } } }));
    expect(() => loadPartsLibrary(typo)).toThrow(/diodes\.x\.saturationCurent: unknown field .* \(did you mean "saturationCurrent"\?\)/);
    const missing = path.join(tmpdir(), 'clipbench-no-such-parts.json');
    expect(() => loadPartsLibrary(missing)).toThrow(UserError);
    const syntax = writeTemp('syntax.json', '{ "diodes": { , } }');
    expect(() => loadPartsLibrary(syntax)).toThrow(/line 1, column 15: expected a double-quoted property name/);
  });
});
