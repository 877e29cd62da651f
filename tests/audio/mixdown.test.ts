// Tests for src/audio/mixdown.ts: the fold-down is the arithmetic mean of the channels, sample by
// sample (definition), computed in double precision from float32 samples.
import { describe, expect, it } from 'vitest';
import { monoFoldDown } from '../../src/audio/mixdown.js';

describe('monoFoldDown', () => {
  it('returns a mono take unchanged, as doubles', () => {
    const take = Float32Array.of(0.1, -0.25, 1, -1);
    expect(Array.from(monoFoldDown([take]))).toEqual(Array.from(take));
  });

  it('is the mean of the channels', () => {
    const left = Float32Array.of(1, 0.5, -1, 0.125);
    const right = Float32Array.of(0, -0.5, -1, 0.375);
    const third = Float32Array.of(0.5, 0.25, 1, -0.5);
    expect(Array.from(monoFoldDown([left, right]))).toEqual([0.5, 0, -1, 0.25]);
    // (1 + 0 + 0.5) / 3 = 0.5, (0.5 - 0.5 + 0.25) / 3, (-1 - 1 + 1) / 3, (0.125 + 0.375 - 0.5) / 3 = 0
    const mean3 = Array.from(monoFoldDown([left, right, third]));
    [0.5, 0.25 / 3, -1 / 3, 0].forEach((expected, i) => expect(mean3[i]).toBeCloseTo(expected, 15));
  });

  it('gives an empty signal for no channels', () => {
    expect(monoFoldDown([]).length).toBe(0);
  });
});
