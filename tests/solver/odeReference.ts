/**
 * Independent reference solutions for the circuit-core tests: circuits written out by hand as ODEs
 * and integrated by Hairer & Wanner's ODEX (Gragg-Bulirsch-Stoer extrapolation, npm package `odex`),
 * rest states found by a plain damped Newton with a finite-difference Jacobian. Nothing here calls
 * the project's solver.
 */
import { Solver } from 'odex';
import { lambertW0Log } from 'lambert-w-function';
import type { DiodeParams } from '../../src/design/types.js';

/** Vt = k T / q with k and q exact in the 2019 SI (BIPM SI Brochure, 9th ed.), written out on purpose. */
export function thermalVolts(temperatureC: number): number {
  return (1.380649e-23 * (temperatureC + 273.15)) / 1.602176634e-19;
}

/**
 * Integrate dy/dt = derivative(t, y) from y0 at t = 0 and sample `output(t, y)` at t = n / sampleRate,
 * n = 0 .. samples - 1, by ODEX dense output at tolerance `tolerance` (absolute and relative), with
 * steps no longer than `maxStepSeconds`.
 */
export function integrateOnGrid(
  derivative: (t: number, y: number[]) => number[],
  y0: number[],
  sampleRate: number,
  samples: number,
  output: (t: number, y: number[]) => number,
  maxStepSeconds: number,
  tolerance: number,
): Float64Array {
  const solver = new Solver(y0.length);
  solver.denseOutput = true;
  solver.absoluteTolerance = tolerance;
  solver.relativeTolerance = tolerance;
  solver.maxSteps = 1e6;
  // Explicit extrapolation overshoots a stiff exponential (a rail clamp, a junction) at large steps and
  // then rejects steps without end; a step cap near the circuit's fastest time constant prevents that.
  solver.maxStepSize = maxStepSeconds;
  const out = new Float64Array(samples);
  let index = 0;
  const result = solver.solve(derivative, 0, y0, (samples - 0.5) / sampleRate, solver.grid(1 / sampleRate, (t: number, y: number[]) => {
    if (index < samples) out[index++] = output(t, y);
  }));
  // Outcome 0 is Converged (odex's Outcome enum).
  if (index !== samples || result.outcome !== 0) throw new Error(`ODEX stopped after ${index} of ${samples} samples`);
  return out;
}

/** Solve A x = b by Gaussian elimination with partial pivoting (small dense systems; a, b overwritten). */
function solveLinear(a: number[][], b: number[]): number[] {
  const n = b.length;
  for (let col = 0; col < n; col++) {
    let best = col;
    for (let row = col + 1; row < n; row++) if (Math.abs(a[row][col]) > Math.abs(a[best][col])) best = row;
    [a[col], a[best]] = [a[best], a[col]];
    [b[col], b[best]] = [b[best], b[col]];
    for (let row = col + 1; row < n; row++) {
      const factor = a[row][col] / a[col][col];
      for (let k = col; k < n; k++) a[row][k] -= factor * a[col][k];
      b[row] -= factor * b[col];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let row = n - 1; row >= 0; row--) {
    let sum = b[row];
    for (let k = row + 1; k < n; k++) sum -= a[row][k] * x[k];
    x[row] = sum / a[row][row];
  }
  return x;
}

/**
 * A root of residual(y) = 0 near `guess`: Newton-Raphson with a central-difference Jacobian, each
 * step scaled down to move no unknown by more than `maxStep` (volts), until the step is below 1e-13.
 */
export function solveSteadyState(residual: (y: number[]) => number[], guess: number[], maxStep = 0.05): number[] {
  const y = [...guess];
  const n = y.length;
  for (let iteration = 0; iteration < 500; iteration++) {
    const r = residual(y);
    const jacobian = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    for (let col = 0; col < n; col++) {
      const h = 1e-7 * Math.max(1, Math.abs(y[col]));
      const up = [...y];
      const down = [...y];
      up[col] += h;
      down[col] -= h;
      const rUp = residual(up);
      const rDown = residual(down);
      for (let row = 0; row < n; row++) jacobian[row][col] = (rUp[row] - rDown[row]) / (2 * h);
    }
    const step = solveLinear(jacobian, r.map((value) => -value));
    const largest = Math.max(...step.map(Math.abs));
    const scale = largest > maxStep ? maxStep / largest : 1;
    for (let k = 0; k < n; k++) y[k] += scale * step[k];
    if (largest < 1e-13) return y;
  }
  throw new Error('reference steady state: Newton did not converge');
}

/** The root of a monotonic f on [lo, hi] (f(lo), f(hi) of opposite signs), by bisection to the last bit. */
export function bisect(f: (x: number) => number, lo: number, hi: number): number {
  const rising = f(hi) > f(lo);
  for (let k = 0; k < 200; k++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) return mid;
    if (f(mid) > 0 === rising) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * Current of one diode with series resistance at terminal voltage v, and its slope:
 * i = (N / Rs) W((Is Rs / N) exp((v + Is Rs) / N)) - Is, N = n Vt (Shockley equation with ohmic
 * resistance solved by the Lambert W function; Banwell & Jayakumar, Electronics Letters 36(4), 2000),
 * di/dv = 1 / (Rs + N / (i + Is)).
 */
export function diodeWithResistance(diode: DiodeParams, temperatureC: number): (v: number) => { amps: number; siemens: number } {
  const emission = diode.ideality * thermalVolts(temperatureC);
  const rs = diode.seriesResistance;
  const is = diode.saturationCurrent;
  const logScale = Math.log((is * rs) / emission);
  return (v) => {
    const amps = (emission / rs) * lambertW0Log(logScale + (v + is * rs) / emission) - is;
    return { amps, siemens: 1 / (rs + emission / (amps + is)) };
  };
}

/** Error energy over reference energy, dB: 10 log10(sum (y - ref)^2 / sum ref^2). */
export function errorEnergyDb(actual: Float64Array, reference: Float64Array): number {
  let error = 0;
  let signal = 0;
  for (let n = 0; n < reference.length; n++) {
    error += (actual[n] - reference[n]) ** 2;
    signal += reference[n] ** 2;
  }
  return 10 * Math.log10(error / signal);
}
