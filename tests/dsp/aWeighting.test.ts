// The A weighting (src/dsp/aWeighting.ts) against the values tabulated in IEC 61672-1 (table of
// frequency weightings, one-decimal dB; from memory): 0 dB at 1 kHz by definition. The table lists
// nominal frequencies; its values are at the exact base-ten midband frequencies 1000 x 10^(k/10)
// (IEC 61260-1), e.g. 31.62 Hz for "31.5".
import { describe, test } from 'vitest';
import { aWeightingPower } from '../../src/dsp/aWeighting.js';
import { expectClose } from '../helpers/expectClose.js';

/** [nominal Hz, k (tenths of a decade from 1 kHz), A dB]. */
const TABLE: Array<[number, number, number]> = [
  [31.5, -15, -39.4],
  [63, -12, -26.2],
  [125, -9, -16.1],
  [250, -6, -8.6],
  [500, -3, -3.2],
  [1000, 0, 0],
  [2000, 3, 1.2],
  [4000, 6, 1.0],
  [8000, 9, -1.1],
  [16000, 12, -6.6],
];

describe('A weighting', () => {
  test.each(TABLE)('%d Hz (nominal): %d dB (IEC 61672-1, rounded to 0.1 dB)', (_nominal, k, db) => {
    expectClose(10 * Math.log10(aWeightingPower(1000 * 10 ** (k / 10))), db, { atol: 0.051 });
  });

  test('exactly 0 dB at 1 kHz within the normalisation constant rounding', () => {
    expectClose(10 * Math.log10(aWeightingPower(1000)), 0, { atol: 1e-3 });
  });
});
