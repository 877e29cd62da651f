/**
 * A precomputed table of the implicit map v = g(p) of equation (1) in `diodeNodeSolver.ts`.
 *
 * g depends only on the design (network, conductance), so it can be tabulated once: uniform grid in
 * p over [-pMax, pMax], values from the Newton solver, exact derivatives g'(p) = 1 / (G + di_d/dv),
 * and cubic Hermite interpolation between grid points (e.g. Press et al., Numerical Recipes, 3rd ed.,
 * sec. 3.3; de Boor, A Practical Guide to Splines, ch. 4). Stored per interval as the four
 * coefficients of c0 + c1 t + c2 t^2 + c3 t^3, t in [0, 1), so a lookup is one index and a Horner
 * step with no transcendental call. p outside the table goes back to the Newton solver.
 */
import { DiodeNodeSolver, type DiodeNetwork } from './diodeNodeSolver.js';

export interface DiodeNodeTable {
  readonly pMin: number; // = -pMax, in amperes (p has the unit of a current)
  readonly intervalsPerAmp: number; // 1 / grid step
  readonly intervals: number;
  /**
   * COEFFICIENTS_PER_INTERVAL per interval: first the cubic of v(t), then the cubic of the state
   * map w(t) = stateGain * v - x (x = table coordinate), both in t in [0, 1).
   */
  readonly coefficients: Float64Array;
  /** 2 a / grid step (a = companion conductance 2C/T): volts to table units in the recursion. */
  readonly stateGain: number;
}

export const COEFFICIENTS_PER_INTERVAL = 8;

/**
 * Tabulate g over [-pMax, pMax] with `intervals` (even) intervals, together with the state map
 * w = stateGain g(p(x)) - x used by the diode node's recursion (see diodeNode.ts); the node's
 * total conductance is `conductanceSiemens`, of which `companionSiemens` is the capacitor's 2C/T. Each half is
 * solved outward from p = 0 with a fresh warm start, so a symmetric network gives an exactly odd
 * table.
 */
export function buildDiodeNodeTable(
  network: DiodeNetwork,
  conductanceSiemens: number,
  pMax: number,
  intervals: number,
  companionSiemens: number,
): DiodeNodeTable {
  const half = intervals / 2;
  const step = pMax / half;
  const stateGain = (2 * companionSiemens) / step;
  const values = new Float64Array(intervals + 1);
  const slopes = new Float64Array(intervals + 1); // dv/dx = g'(p) * step
  const solver = new DiodeNodeSolver(network, conductanceSiemens);
  for (const direction of [1, -1]) {
    solver.reset();
    for (let m = 0; m <= half; m++) {
      const k = half + direction * m;
      values[k] = solver.solve(direction * m * step);
      slopes[k] = solver.slope * step;
    }
  }
  const coefficients = new Float64Array(COEFFICIENTS_PER_INTERVAL * intervals);
  for (let k = 0; k < intervals; k++) {
    const o = COEFFICIENTS_PER_INTERVAL * k;
    writeHermite(coefficients, o, values[k], values[k + 1], slopes[k], slopes[k + 1]);
    // w(x) = stateGain v(x) - x; x = k + t, so w' = stateGain v' - 1.
    writeHermite(
      coefficients,
      o + 4,
      stateGain * values[k] - k,
      stateGain * values[k + 1] - (k + 1),
      stateGain * slopes[k] - 1,
      stateGain * slopes[k + 1] - 1,
    );
  }
  return { pMin: -half * step, intervalsPerAmp: 1 / step, intervals, coefficients, stateGain };
}

/** Cubic Hermite on t in [0, 1) from end values y0, y1 and end slopes m0, m1 (per unit t). */
function writeHermite(out: Float64Array, offset: number, y0: number, y1: number, m0: number, m1: number): void {
  out[offset] = y0;
  out[offset + 1] = m0;
  out[offset + 2] = 3 * (y1 - y0) - 2 * m0 - m1;
  out[offset + 3] = 2 * (y0 - y1) + m0 + m1;
}

/**
 * Largest difference between the table and the Newton solver at the interval midpoints (where
 * cubic Hermite interpolation errs most), in volts.
 */
export function tableErrorVolts(table: DiodeNodeTable, network: DiodeNetwork, conductanceSiemens: number): number {
  const solver = new DiodeNodeSolver(network, conductanceSiemens);
  const step = 1 / table.intervalsPerAmp;
  const c = table.coefficients;
  let worst = 0;
  for (let k = 0; k < table.intervals; k++) {
    const o = COEFFICIENTS_PER_INTERVAL * k;
    const t = 0.5;
    const interpolated = c[o] + t * (c[o + 1] + t * (c[o + 2] + t * c[o + 3]));
    const exact = solver.solve(table.pMin + (k + t) * step);
    worst = Math.max(worst, Math.abs(interpolated - exact));
  }
  return worst;
}
