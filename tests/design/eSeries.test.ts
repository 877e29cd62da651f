import { describe, expect, test } from 'vitest';
import { E_SERIES, nearestStandardValues } from '../../src/design/eSeries.js';

describe('E-series (IEC 60063)', () => {
  test('tables hold the values the standard lists', () => {
    // IEC 60063 E12 and E24 (two significant digits)
    expect(E_SERIES.E12).toEqual([10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82]);
    expect(E_SERIES.E24).toEqual([10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91]);
  });

  test('standard values are on the series in every decade', () => {
    for (const value of [4.7, 47, 470, 4700, 47e3, 470e3, 4.7e6, 100e-9, 2.2e-6, 10e-12, 1e6]) {
      expect(nearestStandardValues(value, 'E12'), String(value)).toMatchObject({ onSeries: true, nearest: value });
    }
    expect(nearestStandardValues(5100, 'E24').onSeries).toBe(true); // 51 is E24 only
    expect(nearestStandardValues(5100, 'E12')).toEqual({ below: 4700, above: 5600, nearest: 4700, onSeries: false });
  });

  test('off-series values get the neighbours either side', () => {
    expect(nearestStandardValues(5000, 'E24')).toEqual({ below: 4700, above: 5100, nearest: 5100, onSeries: false });
    expect(nearestStandardValues(500e3, 'E12')).toEqual({ below: 470e3, above: 560e3, nearest: 470e3, onSeries: false });
    // across the decade: 95k lies between 91k and 100k in E24; nearer 91k by ratio (95/91 < 100/95)
    expect(nearestStandardValues(95e3, 'E24')).toEqual({ below: 91e3, above: 100e3, nearest: 91e3, onSeries: false });
    expect(nearestStandardValues(97e3, 'E24')).toEqual({ below: 91e3, above: 100e3, nearest: 100e3, onSeries: false });
    expect(nearestStandardValues(90, 'E12')).toEqual({ below: 82, above: 100, nearest: 82, onSeries: false });
  });
});
