import { describe, expect, it } from 'vitest';
import { besselI0, kaiserBeta, kaiserOrder, kaiserWindowAt } from '../../src/dsp/kaiser.js';
import { expectClose } from '../helpers/expectClose.js';

describe('Kaiser window', () => {
  it('I0 matches tabulated values (Abramowitz & Stegun Table 9.8, from memory)', () => {
    expect(besselI0(0)).toBe(1);
    expectClose(besselI0(1), 1.2660658777520082, { rtol: 1e-14 });
    expectClose(besselI0(5), 27.239871823604442, { rtol: 1e-13 });
    // Large argument: I0(x) ~ e^x / sqrt(2 pi x) (1 + 1/(8x) + 9/(128 x^2)) (A&S 9.7.1).
    const x = 40;
    const asymptotic = (Math.exp(x) / Math.sqrt(2 * Math.PI * x)) * (1 + 1 / (8 * x) + 9 / (128 * x * x) + 225 / (3072 * x ** 3));
    expectClose(besselI0(x), asymptotic, { rtol: 1e-6 });
  });

  it('beta follows Kaiser: 6.20426 for 65 dB (scipy.signal.kaiser_beta documentation example)', () => {
    expectClose(kaiserBeta(65), 6.20426, { atol: 1e-5 });
    expectClose(kaiserBeta(100), 0.1102 * (100 - 8.7), { rtol: 1e-15 });
    expect(kaiserBeta(20)).toBe(0);
  });

  it('order grows as (A - 8) / (2.285 * 2 pi * width) (Oppenheim & Schafer, 2nd ed., pp. 475-476)', () => {
    // A = 65 dB, width 0.024 of the sample rate: (57) / (2.285 * 0.1508) = 165.4 -> 166.
    expect(kaiserOrder(65, 0.024)).toBe(166);
  });

  it('window is 1 at the centre, symmetric, and 1 / I0(beta) at the ends', () => {
    const beta = 8;
    expect(kaiserWindowAt(0, 10, beta)).toBe(1);
    expect(kaiserWindowAt(3, 10, beta)).toBe(kaiserWindowAt(-3, 10, beta));
    expectClose(kaiserWindowAt(10, 10, beta), 1 / besselI0(beta), { rtol: 1e-15 });
  });
});
