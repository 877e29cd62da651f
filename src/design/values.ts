/**
 * Component values as people write them: plain numbers in SI base units, numbers with an SI prefix
 * and an optional unit ("4.7k", "100nF", "4.7kΩ", "10V"), or RKM codes (IEC 60062), where the
 * multiplier letter stands in for the decimal point ("4k7" = 4.7 kΩ, "R47" = 0.47 Ω, "2u2" = 2.2 µF).
 */
import { UserError } from '../errors.js';

export type ValueUnit = 'ohm' | 'farad' | 'henry' | 'volt' | 'ampere' | 'hertz' | 'voltPerSecond' | 'ratio';

export interface ParseValueOptions {
  /** Accept 0 (e.g. an optional series resistor, a unity-gain rf). Negative values are never valid. */
  allowZero?: boolean;
}

/** Powers of ten of the SI prefixes (and the RKM multiplier letters). */
const PREFIX_EXPONENTS: Readonly<Record<string, number>> = {
  p: -12,
  n: -9,
  u: -6,
  µ: -6, // U+00B5 micro sign
  μ: -6, // U+03BC Greek mu
  m: -3,
  k: 3,
  K: 3,
  M: 6,
  G: 9,
};

/**
 * Decimal text times 10^exponent, scaled in the decimal text itself so "100n" is exactly the double
 * nearest 1e-7 (multiplying by 1e-9 would add a rounding error).
 */
function scaleDecimal(numberText: string, exponent: number): number {
  const [mantissa, ownExponent = '0'] = numberText.split(/[eE]/) as [string, string?];
  return Number(`${mantissa}e${Number(ownExponent) + exponent}`);
}

interface UnitInfo {
  noun: string;
  expected: string;
  /** Unit symbols accepted after the number (case-sensitive as listed). */
  symbols: string[];
  /** Letter that marks the decimal point with multiplier 1 in an RKM code (R for ohms, F for farads). */
  rkmUnitLetter: string | null;
}

const UNITS: Readonly<Record<ValueUnit, UnitInfo>> = {
  ohm: {
    noun: 'resistance',
    expected: 'ohms, e.g. 4.7k, 4k7 or 4700',
    symbols: ['ohms', 'ohm', 'Ohm', 'Ω'],
    rkmUnitLetter: 'R',
  },
  farad: {
    noun: 'capacitance',
    expected: 'farads, e.g. 100n, 2u2 or 1e-7',
    symbols: ['F'],
    rkmUnitLetter: 'F',
  },
  henry: { noun: 'inductance', expected: 'henries, e.g. 3, 3H or 470m', symbols: ['H'], rkmUnitLetter: null },
  volt: { noun: 'voltage', expected: 'volts, e.g. 9, 9V or 1.5', symbols: ['V'], rkmUnitLetter: 'V' },
  ampere: { noun: 'current', expected: 'amperes, e.g. 2.52n, 10m or 0.02', symbols: ['A'], rkmUnitLetter: 'A' },
  hertz: { noun: 'frequency', expected: 'hertz, e.g. 1k, 4MHz or 440', symbols: ['Hz'], rkmUnitLetter: null },
  voltPerSecond: { noun: 'slew rate', expected: 'volts per second, e.g. 16e6, 16M or 16MV/s', symbols: ['V/s'], rkmUnitLetter: null },
  ratio: { noun: 'gain', expected: 'a ratio in V/V, e.g. 200k or 2e5', symbols: ['V/V'], rkmUnitLetter: null },
};

const PREFIX_CLASS = 'pnuµμmkKMG';
// "4.7k", "100", "1e-7", ".5m" followed by an optional unit symbol.
const SI_PATTERN = new RegExp(`^((?:\\d+(?:\\.\\d*)?|\\.\\d+)(?:[eE][+-]?\\d+)?)\\s?([${PREFIX_CLASS}]?)(.*)$`);
// RKM (IEC 60062): digits, one multiplier letter in place of the decimal point, digits (either side may
// be empty, not both: "R47", "4k7", "332R"); optional unit after.
const RKM_PATTERN = new RegExp(`^(\\d*)([${PREFIX_CLASS}RFVA])(\\d*)(.*)$`);

function describeValue(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'number') return String(value);
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'an array';
  return typeof value === 'object' ? 'an object' : String(value);
}

function badValue(value: unknown, path: string, unit: ValueUnit): UserError {
  const info = UNITS[unit];
  const article = /^[aeiou]/.test(info.noun) ? 'an' : 'a';
  return new UserError(`${path}: ${describeValue(value)} is not ${article} ${info.noun} (expected ${info.expected})`);
}

function unitSuffixOk(suffix: string, info: UnitInfo): boolean {
  return suffix === '' || info.symbols.includes(suffix);
}

function exponentOf(letter: string, info: UnitInfo): number | null {
  if (letter === info.rkmUnitLetter) return 0;
  return PREFIX_EXPONENTS[letter] ?? null;
}

function parseString(text: string, info: UnitInfo): number | null {
  const trimmed = text.trim();
  const si = SI_PATTERN.exec(trimmed);
  if (si) {
    const [, numberText, prefix, suffix] = si as unknown as [string, string, string, string];
    if (unitSuffixOk(suffix.trimStart(), info)) {
      const exponent = prefix === '' ? 0 : PREFIX_EXPONENTS[prefix];
      if (exponent !== undefined) return scaleDecimal(numberText, exponent);
    }
  }
  const rkm = RKM_PATTERN.exec(trimmed);
  if (rkm) {
    const [, whole, letter, fraction, suffix] = rkm as unknown as [string, string, string, string, string];
    const exponent = exponentOf(letter, info);
    if (exponent !== null && whole + fraction !== '' && unitSuffixOk(suffix, info)) {
      return scaleDecimal(`${whole === '' ? '0' : whole}.${fraction === '' ? '0' : fraction}`, exponent);
    }
  }
  return null;
}

/**
 * Parse one component value into SI base units. `path` names where the value came from (e.g.
 * `design.json: stages[2].series`) and starts every error message. Throws `UserError` for anything
 * that is not a finite positive value of the requested unit (zero only with `allowZero`).
 */
export function parseValue(value: unknown, path: string, unit: ValueUnit, options: ParseValueOptions = {}): number {
  const info = UNITS[unit];
  let parsed: number | null = null;
  if (typeof value === 'number') parsed = value;
  else if (typeof value === 'string') parsed = parseString(value, info);
  if (parsed === null || !Number.isFinite(parsed) || parsed < 0) throw badValue(value, path, unit);
  if (parsed === 0 && !options.allowZero) {
    throw new UserError(`${path}: ${describeValue(value)} is not a valid ${info.noun} (must be greater than 0; expected ${info.expected})`);
  }
  return parsed;
}

/** Human-readable form with an SI prefix, e.g. 4700 -> "4.7k", 1e-7 -> "100n" (3 significant digits). */
export function formatValue(value: number, unitSymbol = ''): string {
  if (!Number.isFinite(value)) return `${value}`;
  if (value === 0) return `0${unitSymbol}`;
  const prefixes: [number, string][] = [
    [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'u'], [1e-9, 'n'], [1e-12, 'p'],
  ];
  const magnitude = Math.abs(value);
  const [scale, prefix] = prefixes.find(([s]) => magnitude >= s * 0.9995) ?? [1e-12, 'p'];
  const scaled = Number((value / scale).toPrecision(3));
  return `${scaled}${prefix}${unitSymbol}`;
}
