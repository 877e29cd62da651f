/**
 * Preferred-number series for resistors and capacitors (IEC 60063): E12 and E24 values per decade.
 */

export type ESeriesName = 'E12' | 'E24';

/** IEC 60063 values for one decade, scaled to 10..100. */
export const E_SERIES: Readonly<Record<ESeriesName, readonly number[]>> = {
  E12: [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82],
  E24: [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91],
};

/** Relative tolerance for "this value is on the series" (floating-point noise, not part tolerance). */
const ON_SERIES_TOLERANCE = 1e-9;

export interface StandardValues {
  /** Largest series value <= value. */
  below: number;
  /** Smallest series value >= value. */
  above: number;
  /** The closer of below/above by ratio (the series is geometric). */
  nearest: number;
  onSeries: boolean;
}

/** `mantissa * 10^exponent`, rounded to 12 significant digits so 4.7 * 1e3 prints as 4700. */
function scaled(mantissa: number, exponent: number): number {
  return Number((mantissa * Math.pow(10, exponent)).toPrecision(12));
}

/** The standard values either side of `value` (> 0) in the E12 or E24 series. */
export function nearestStandardValues(value: number, series: ESeriesName): StandardValues {
  if (!(value > 0 && Number.isFinite(value))) throw new RangeError(`nearestStandardValues: value must be finite and > 0, got ${value}`);
  const table = E_SERIES[series];
  const exponent = Math.floor(Math.log10(value)) - 1;
  let mantissa = value / Math.pow(10, exponent);
  let decade = exponent;
  // log10 rounding can leave the mantissa just outside [10, 100)
  if (mantissa >= 100 * (1 - ON_SERIES_TOLERANCE)) {
    mantissa /= 10;
    decade += 1;
  } else if (mantissa < 10 * (1 - ON_SERIES_TOLERANCE)) {
    mantissa *= 10;
    decade -= 1;
  }
  const exact = table.find((entry) => Math.abs(entry - mantissa) <= ON_SERIES_TOLERANCE * entry);
  if (exact !== undefined) {
    const standard = scaled(exact, decade);
    return { below: standard, above: standard, nearest: standard, onSeries: true };
  }
  // mantissa is in [10, 100) and table[0] = 10, so there is always an entry below it
  const aboveIndex = table.findIndex((entry) => entry > mantissa);
  const below = scaled(table[(aboveIndex < 0 ? table.length : aboveIndex) - 1]!, decade);
  const above = aboveIndex < 0 ? scaled(table[0]!, decade + 1) : scaled(table[aboveIndex]!, decade);
  const nearest = value / below <= above / value ? below : above;
  return { below, above, nearest, onSeries: false };
}
