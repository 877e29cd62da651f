import { describe, expect, test } from 'vitest';
import { UserError } from '../../src/errors.js';
import { formatValue, parseValue } from '../../src/design/values.js';
import { expectClose } from '../helpers/expectClose.js';

const at = 'design.json: stages[2].series';

describe('parseValue: RKM codes (IEC 60062)', () => {
  // Examples of the IEC 60062 letter-and-digit code (the multiplier letter takes the place of the
  // decimal point; R = ohms x1 for resistors), from memory of the standard's tables.
  const resistorCodes: [string, number][] = [
    ['R47', 0.47],
    ['R10', 0.1],
    ['R332', 0.332],
    ['0R5', 0.5],
    ['3R32', 3.32],
    ['4R7', 4.7],
    ['33R2', 33.2],
    ['332R', 332],
    ['4k7', 4700],
    ['3K32', 3320],
    ['33K2', 33200],
    ['1M5', 1.5e6],
    ['3M32', 3.32e6],
    ['2G2', 2.2e9],
  ];
  test.each(resistorCodes)('resistor %s = %f ohm', (code, ohms) => {
    expectClose(parseValue(code, at, 'ohm'), ohms, { rtol: 1e-12 });
  });

  // Capacitor examples of the same code (from memory of IEC 60062): p10 = 0.1 pF ... 4u7 = 4.7 uF.
  const capacitorCodes: [string, number][] = [
    ['p10', 0.1e-12],
    ['1p5', 1.5e-12],
    ['4p7', 4.7e-12],
    ['1n0', 1e-9],
    ['4n7', 4.7e-9],
    ['33n2', 33.2e-9],
    ['2u2', 2.2e-6],
    ['4µ7', 4.7e-6],
    ['4μ7', 4.7e-6],
    ['3m3', 3.3e-3],
  ];
  test.each(capacitorCodes)('capacitor %s = %e F', (code, farads) => {
    expectClose(parseValue(code, at, 'farad'), farads, { rtol: 1e-12 });
  });
});

describe('parseValue: SI prefixes (SI brochure prefixes p n u m k M G)', () => {
  const cases: [unknown, 'ohm' | 'farad' | 'volt' | 'ampere' | 'hertz', number][] = [
    [4700, 'ohm', 4700],
    ['4.7k', 'ohm', 4700],
    ['4.7K', 'ohm', 4700],
    ['100n', 'farad', 100e-9],
    ['2.2u', 'farad', 2.2e-6],
    ['1M', 'ohm', 1e6], // capital M = mega
    ['0.5m', 'ohm', 0.5e-3], // small m = milli
    ['470p', 'farad', 470e-12],
    ['100nF', 'farad', 100e-9],
    ['100 nF', 'farad', 100e-9],
    ['4.7kohm', 'ohm', 4700],
    ['4.7kΩ', 'ohm', 4700],
    ['10V', 'volt', 10],
    ['9', 'volt', 9],
    ['2.52nA', 'ampere', 2.52e-9],
    ['4MHz', 'hertz', 4e6],
    ['1e-7', 'farad', 1e-7],
  ];
  test.each(cases)('%s (%s) = %f', (text, unit, expected) => {
    expectClose(parseValue(text, at, unit), expected, { rtol: 1e-12 });
  });

  test('a prefixed value is the nearest double to the decimal value (100n === 1e-7)', () => {
    // 100 * 1e-9 in binary floating point is 1.0000000000000001e-7; the parser scales in decimal.
    expect(parseValue('100n', at, 'farad')).toBe(1e-7);
    expect(parseValue('4k7', at, 'ohm')).toBe(4700);
    expect(parseValue('2u2', at, 'farad')).toBe(2.2e-6);
  });
});

describe('parseValue: rejects what is not a value', () => {
  const bad: unknown[] = ['2.2kk', '-2k2', '4,7k', '', ' ', 'abc', 'k', '1.2.3', NaN, Infinity, -5, null, true, {}, [], '10V', '4k7F'];
  test.each(bad)('%s is rejected with path, value and expectation', (value) => {
    let thrown: unknown;
    try {
      parseValue(value, at, 'ohm');
    } catch (error) {
      thrown = error;
    }
    expect(thrown).toBeInstanceOf(UserError);
    const message = (thrown as UserError).message;
    expect(message.startsWith(`${at}: `)).toBe(true);
    expect(message).toContain('resistance');
    expect(message).toContain('ohms');
  });

  test('the message quotes the value exactly as the issue shows', () => {
    expect(() => parseValue('2.2kk', 'design.json: stages[2].series', 'ohm')).toThrow(
      'design.json: stages[2].series: "2.2kk" is not a resistance (expected ohms, e.g. 4.7k, 4k7 or 4700)',
    );
  });

  test('zero only where allowed', () => {
    expect(() => parseValue(0, at, 'ohm')).toThrow(/must be greater than 0/);
    expect(() => parseValue('0', at, 'farad')).toThrow(/capacitance/);
    expect(parseValue(0, at, 'ohm', { allowZero: true })).toBe(0);
    expect(parseValue('0R', at, 'ohm', { allowZero: true })).toBe(0);
  });

  test('unit letters do not cross units (R is ohms only, F farads only)', () => {
    expect(() => parseValue('4R7', at, 'farad')).toThrow(UserError);
    expect(() => parseValue('4F7', at, 'ohm')).toThrow(UserError);
    expect(parseValue('4F7', at, 'farad')).toBe(4.7);
  });
});

describe('formatValue', () => {
  test('prints with an SI prefix and 3 significant digits', () => {
    expect(formatValue(4700, 'Ω')).toBe('4.7kΩ');
    expect(formatValue(1e-7, 'F')).toBe('100nF');
    expect(formatValue(1e6)).toBe('1M');
    expect(formatValue(0.47)).toBe('470m');
    expect(formatValue(12345)).toBe('12.3k');
  });
});
