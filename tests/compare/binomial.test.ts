import { describe, expect, it } from 'vitest';
import { binomialTailProbability } from '../../src/compare/binomial.js';
import { expectClose } from '../helpers/expectClose.js';

/** C(n, k) by the multiplicative formula, exact in doubles for the small n used here. */
function choose(n: number, k: number): number {
  let c = 1;
  for (let i = 1; i <= k; i++) c = (c * (n - k + i)) / i;
  return c;
}

describe('binomialTailProbability', () => {
  it('10 of 12 correct by guessing: (C(12,10) + C(12,11) + C(12,12)) / 2^12 = 79/4096', () => {
    // Binomial distribution, textbook: P(K >= k) = sum_{i>=k} C(n,i) p^i (1-p)^(n-i), p = 1/2.
    // Hand calculation: 66 + 12 + 1 = 79; 79 / 4096 = 0.019287...
    expectClose(binomialTailProbability(10, 12), 79 / 4096, { rtol: 1e-12 });
  });

  it('matches the textbook sum for every score of 16 trials, and its limits', () => {
    for (let k = 0; k <= 16; k++) {
      let expected = 0;
      for (let i = k; i <= 16; i++) expected += choose(16, i);
      expectClose(binomialTailProbability(k, 16), expected / 2 ** 16, { rtol: 1e-12 });
    }
    expect(binomialTailProbability(0, 10)).toBe(1);
    expect(binomialTailProbability(11, 10)).toBe(0);
    // All 5 right: 1/32 (one outcome of 2^5).
    expectClose(binomialTailProbability(5, 5), 1 / 32, { rtol: 1e-12 });
  });

  it('is self-contained, so the page can embed its source', () => {
    const rebuilt = new Function(`return ${binomialTailProbability.toString()}`)() as (k: number, n: number) => number;
    expectClose(rebuilt(10, 12), 79 / 4096, { rtol: 1e-12 });
  });
});
