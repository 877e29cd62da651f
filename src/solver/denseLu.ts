/**
 * Dense LU factorisation with partial pivoting (Doolittle, row-major), for the small systems of the
 * circuit core: the MNA matrices at design time and the nonlinear blocks per sample (Golub & Van Loan,
 * Matrix Computations, 4th ed., algorithm 3.4.1). Everything works in place on caller-owned arrays,
 * so the per-sample solves allocate nothing.
 */

/** Pivots smaller than this (relative to the largest entry of their column) count as singular. */
export const SINGULAR_PIVOT_RATIO = 1e-14;

/**
 * Factor the n x n row-major matrix `a` in place into L (unit lower, below the diagonal) and U,
 * recording row swaps in `pivots`. Returns false when a pivot is (numerically) zero: below
 * SINGULAR_PIVOT_RATIO times the largest entry of its column in the original matrix, so that a
 * well-posed but badly scaled matrix (diag(1, 1e15): a conducting junction beside a cut-off one) is
 * not mistaken for a singular one. `columnScale` (length >= n) is scratch space; per-sample callers
 * pass their own so nothing is allocated.
 */
export function factorLu(a: Float64Array, n: number, pivots: Int32Array, columnScale: Float64Array = new Float64Array(n)): boolean {
  for (let col = 0; col < n; col++) {
    let largest = 0;
    for (let row = 0; row < n; row++) largest = Math.max(largest, Math.abs(a[row * n + col]));
    columnScale[col] = largest;
  }
  for (let col = 0; col < n; col++) {
    const tiny = columnScale[col] * SINGULAR_PIVOT_RATIO;
    let best = col;
    let bestAbs = Math.abs(a[col * n + col]);
    for (let row = col + 1; row < n; row++) {
      const value = Math.abs(a[row * n + col]);
      if (value > bestAbs) {
        best = row;
        bestAbs = value;
      }
    }
    pivots[col] = best;
    if (!(bestAbs > tiny)) return false;
    if (best !== col) {
      for (let k = 0; k < n; k++) {
        const t = a[col * n + k];
        a[col * n + k] = a[best * n + k];
        a[best * n + k] = t;
      }
    }
    const pivot = a[col * n + col];
    for (let row = col + 1; row < n; row++) {
      const factor = a[row * n + col] / pivot;
      a[row * n + col] = factor;
      if (factor === 0) continue;
      for (let k = col + 1; k < n; k++) a[row * n + k] -= factor * a[col * n + k];
    }
  }
  return true;
}

/** Solve (LU) x = b in place in `b`, with `lu` and `pivots` from `factorLu`. */
export function solveLu(lu: Float64Array, n: number, pivots: Int32Array, b: Float64Array): void {
  for (let row = 0; row < n; row++) {
    const p = pivots[row];
    if (p !== row) {
      const t = b[row];
      b[row] = b[p];
      b[p] = t;
    }
  }
  for (let row = 1; row < n; row++) {
    let sum = b[row];
    for (let k = 0; k < row; k++) sum -= lu[row * n + k] * b[k];
    b[row] = sum;
  }
  for (let row = n - 1; row >= 0; row--) {
    let sum = b[row];
    for (let k = row + 1; k < n; k++) sum -= lu[row * n + k] * b[k];
    b[row] = sum / lu[row * n + row];
  }
}

/**
 * Solve the complex system (re + j im) x = (bRe + j bIm) in place, as the real system of twice the
 * size [[re, -im], [im, re]] [xRe; xIm] = [bRe; bIm]. Returns false when singular.
 */
export function solveComplex(re: Float64Array, im: Float64Array, n: number, bRe: Float64Array, bIm: Float64Array): boolean {
  const m = 2 * n;
  const a = new Float64Array(m * m);
  for (let row = 0; row < n; row++) {
    for (let col = 0; col < n; col++) {
      const r = re[row * n + col];
      const i = im[row * n + col];
      a[row * m + col] = r;
      a[row * m + n + col] = -i;
      a[(n + row) * m + col] = i;
      a[(n + row) * m + n + col] = r;
    }
  }
  const b = new Float64Array(m);
  b.set(bRe, 0);
  b.set(bIm, n);
  const pivots = new Int32Array(m);
  if (!factorLu(a, m, pivots)) return false;
  solveLu(a, m, pivots, b);
  bRe.set(b.subarray(0, n));
  bIm.set(b.subarray(n));
  return true;
}
