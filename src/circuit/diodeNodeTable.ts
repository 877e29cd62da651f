/**
 * A precomputed table of the implicit map v = g(p) of equation (1) in `diodeNodeSolver.ts`.
 *
 * g depends only on the design (network, conductance), so it can be tabulated once: uniform grid in
 * p over [-pMax, pMax], values from the Newton solver, and linear interpolation between grid points.
 * The chord's error is at most h^2 max|g''| / 8 for grid step h (e.g. Press et al., Numerical
 * Recipes, 3rd ed., sec. 3.1); the grid is made fine enough for the design's tolerance
 * (diodeNode.ts). Linear rather than cubic: the diode node's recursion waits on each lookup, and a
 * line in absolute table coordinates, c0 + x c1, is one index, one multiply and one add on that
 * chain (no floor, no powers of t). p outside the table goes back to the Newton solver.
 */
import { DiodeNodeSolver, type DiodeNetwork } from './diodeNodeSolver.js';

export interface DiodeNodeTable {
  readonly pMin: number; // = -pMax, in amperes (p has the unit of a current)
  readonly intervalsPerAmp: number; // 1 / grid step
  readonly intervals: number;
  /**
   * COEFFICIENTS_PER_INTERVAL per interval k (table coordinate x = (p - pMin) / step in [k, k + 1)):
   * the line of v(x) = c0 + x c1, then the line of the state map w(x) = stateGain v(x) - x.
   */
  readonly coefficients: Float64Array;
  /** 2 a / grid step (a = companion conductance 2C/T): volts to table units in the recursion. */
  readonly stateGain: number;
}

export const COEFFICIENTS_PER_INTERVAL = 4;

/**
 * Tabulate g over [-pMax, pMax] with `intervals` (even) intervals, together with the state map
 * w = stateGain g(p(x)) - x used by the diode node's recursion (see diodeNode.ts); the node's
 * total conductance is `conductanceSiemens`, of which `companionSiemens` is the capacitor's 2C/T.
 * Each half is solved outward from p = 0 with a fresh warm start, so a symmetric network gives
 * exactly odd grid values.
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
  const solver = new DiodeNodeSolver(network, conductanceSiemens);
  for (const direction of [1, -1]) {
    solver.reset();
    for (let m = 0; m <= half; m++) values[half + direction * m] = solver.solve(direction * m * step);
  }
  const coefficients = new Float64Array(COEFFICIENTS_PER_INTERVAL * intervals);
  for (let k = 0; k < intervals; k++) {
    const o = COEFFICIENTS_PER_INTERVAL * k;
    const slope = values[k + 1] - values[k]; // volts per table unit
    coefficients[o] = values[k] - k * slope;
    coefficients[o + 1] = slope;
    // w(x) = stateGain v(x) - x on the same chord: slope stateGain * slope - 1.
    coefficients[o + 2] = stateGain * coefficients[o];
    coefficients[o + 3] = stateGain * slope - 1;
  }
  return { pMin: -half * step, intervalsPerAmp: 1 / step, intervals, coefficients, stateGain };
}

/** The table's v at table coordinate x in [0, intervals), in volts. */
export function tableVolts(table: DiodeNodeTable, x: number): number {
  const o = COEFFICIENTS_PER_INTERVAL * Math.floor(x);
  return table.coefficients[o] + x * table.coefficients[o + 1];
}

/**
 * Largest difference between the table and the Newton solver at the interval midpoints (where
 * linear interpolation errs most), in volts.
 */
export function tableErrorVolts(table: DiodeNodeTable, network: DiodeNetwork, conductanceSiemens: number): number {
  const solver = new DiodeNodeSolver(network, conductanceSiemens);
  const step = 1 / table.intervalsPerAmp;
  let worst = 0;
  for (let k = 0; k < table.intervals; k++) {
    const x = k + 0.5;
    worst = Math.max(worst, Math.abs(tableVolts(table, x) - solver.solve(table.pMin + x * step)));
  }
  return worst;
}
