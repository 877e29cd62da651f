// Tests for src/solver/denseLu.ts: LU with partial pivoting (Golub & Van Loan, Matrix Computations,
// 4th ed., algorithm 3.4.1) recovers known solutions; complex systems as their real 2n form.
import { describe, expect, test } from 'vitest';
import { factorLu, solveComplex, solveLu } from '../../src/solver/denseLu.js';
import { expectClose } from '../helpers/expectClose.js';
import { createUniformRandom } from '../dsp/testSignals.js';

/** b = A x for row-major A. */
function multiply(a: Float64Array, x: Float64Array): Float64Array {
  const n = x.length;
  return Float64Array.from({ length: n }, (_, row) => {
    let sum = 0;
    for (let col = 0; col < n; col++) sum += a[row * n + col] * x[col];
    return sum;
  });
}

describe('factorLu / solveLu', () => {
  test('a seeded random 6 x 6 system: x recovered from b = A x to 1e-12', () => {
    // Uniform random entries in [-1, 1) (fixed seed): well conditioned with overwhelming likelihood;
    // GEPP is backward stable (Golub & Van Loan, section 3.4.6), so the error is rounding-sized.
    const n = 6;
    const random = createUniformRandom(12345);
    const a = Float64Array.from({ length: n * n }, () => random() * 2 - 1);
    const x = Float64Array.from({ length: n }, () => random() * 2 - 1);
    const b = multiply(a, x);
    const lu = Float64Array.from(a);
    const pivots = new Int32Array(n);
    expect(factorLu(lu, n, pivots)).toBe(true);
    solveLu(lu, n, pivots, b);
    for (let k = 0; k < n; k++) expectClose(b[k], x[k], { atol: 1e-12 });
  });

  test('a zero pivot is reported: a matrix with two equal rows is singular', () => {
    const a = Float64Array.from([1, 2, 3, 4, 5, 6, 1, 2, 3]);
    expect(factorLu(a, 3, new Int32Array(3))).toBe(false);
  });

  // BUG (see the report): the singularity test compares each pivot with 1e-14 times the largest entry
  // of the whole matrix, so a nonsingular matrix whose rows differ in scale by more than 1e14 is
  // reported singular. diag(1, 1e15) is solved exactly by any elimination. The per-sample Newton
  // matrix I - F J of an exponential device deep in conduction has exactly this shape (one entry of
  // 1e22 beside entries of order 1), so the DK processor gives up on that sample.
  test('a nonsingular matrix with rows of very different scale, diag(1, 1e15), factors and solves exactly', () => {
    const a = Float64Array.from([1, 0, 0, 1e15]);
    const pivots = new Int32Array(2);
    expect(factorLu(a, 2, pivots)).toBe(true);
    const b = Float64Array.from([3, 2e15]);
    solveLu(a, 2, pivots, b);
    expect(Array.from(b)).toEqual([3, 2]);
  });
});

describe('solveComplex', () => {
  test('(1 + j) x = 2 gives x = 1 - j; a 2 x 2 complex system against its hand solution', () => {
    const re1 = Float64Array.from([1]);
    const bRe1 = Float64Array.from([2]);
    const bIm1 = Float64Array.from([0]);
    expect(solveComplex(re1, Float64Array.from([1]), 1, bRe1, bIm1)).toBe(true);
    expectClose(bRe1[0], 1, { atol: 1e-15 });
    expectClose(bIm1[0], -1, { atol: 1e-15 });
    // [[j, 1], [1, 0]] x = [1, j]: second row x1 = j, first row j x1 + x2 = 1 so x2 = 1 - j j = 2.
    const bRe = Float64Array.from([1, 0]);
    const bIm = Float64Array.from([0, 1]);
    expect(solveComplex(Float64Array.from([0, 1, 1, 0]), Float64Array.from([1, 0, 0, 0]), 2, bRe, bIm)).toBe(true);
    expectClose(bRe[0], 0, { atol: 1e-15 });
    expectClose(bIm[0], 1, { atol: 1e-15 });
    expectClose(bRe[1], 2, { atol: 1e-15 });
    expectClose(bIm[1], 0, { atol: 1e-15 });
  });
});
