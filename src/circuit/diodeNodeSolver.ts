/**
 * The implicit equation shared by the diode clipper and the gain stage's feedback diodes.
 *
 * Both are a node with a linear conductance G to the bias point (a resistor plus, after the
 * trapezoidal rule, the capacitor's companion conductance 2C/T) and a diode network, driven by a
 * known current. Each time step reduces to one scalar equation for the node voltage v:
 *
 *   G v + i_d(v) = p                                                     (1)
 *
 * where p collects the drive and the previous state. The left side rises strictly with v, so (1)
 * has exactly one root and sign(v) = sign(p).
 *
 * Diode network: an "up" string conducting for v > 0 and a "down" string for v < 0 (either may be
 * absent). For p > 0 the up string is forward-biased. Its ohmic resistance makes i(v) implicit, so
 * the unknown is the string's junction voltage u instead of v:
 *
 *   i_f = Is (exp(u / N) - 1),   v = u + R i_f,   N = m n Vt, R = m Rs     (Shockley with Rs)
 *
 * which is explicit in u. The reverse-biased string carries i_r = -Is_r (1 - exp(-v / N_r)); its
 * ohmic drop (below Is_r R_r, nanovolts) is neglected. For p < 0 the roles swap (mirror image), so a
 * symmetric network gives an exactly odd map.
 *
 * Method: Newton-Raphson on u, warm-started from the previous solution with the previous slope
 * dv/dp as predictor, each step limited to STEP_LIMIT_EMISSIONS times N (so exp never overflows) and
 * kept inside a bracket that is known to hold the root: 0 <= u <= min(p/G, N ln(1 + p/Is)) (the
 * diode current cannot exceed p and v cannot exceed p/G). A step leaving the bracket becomes a
 * bisection step. If Newton has not converged after MAX_ITERATIONS, bisection on the bracket
 * finishes the job (counted in `fallbacks`).
 */
import { stringConductance, type DiodeString } from './diode.js';

/** Newton iterations before the bisection fallback takes over. */
export const MAX_ITERATIONS = 40;
/** Convergence: the last Newton step on the junction voltage was below this. */
export const TOLERANCE_VOLTS = 1e-10;
/** Largest Newton step, in units of the forward string's emission voltage m n Vt. */
export const STEP_LIMIT_EMISSIONS = 4;
/** Reverse string fully saturated beyond this many emission voltages (skips one exp). */
const REVERSE_SATURATED_EMISSIONS = 40;
/** Bisection halvings cap (the bracket shrinks below TOLERANCE_VOLTS long before). */
const MAX_BISECTIONS = 200;

export interface DiodeNetwork {
  readonly up: DiodeString | null; // conducts for positive node voltage
  readonly down: DiodeString | null; // conducts for negative node voltage
}

/** Forward/reverse constants for one polarity; absent strings get Is = 0 and N = Infinity. */
interface Side {
  forwardIs: number;
  forwardN: number;
  forwardR: number;
  reverseIs: number;
  reverseN: number;
}

function sideOf(forward: DiodeString | null, reverse: DiodeString | null): Side {
  return {
    forwardIs: forward?.saturationAmps ?? 0,
    forwardN: forward?.emissionVolts ?? Infinity,
    forwardR: forward?.seriesOhms ?? 0,
    reverseIs: reverse?.saturationAmps ?? 0,
    reverseN: reverse?.emissionVolts ?? Infinity,
  };
}

/** Small-signal conductance of the network at 0 V (both strings at zero current). */
export function networkConductanceAtZero(network: DiodeNetwork): number {
  let siemens = 0;
  if (network.up) siemens += stringConductance(network.up, 0);
  if (network.down) siemens += stringConductance(network.down, 0);
  return siemens;
}

/**
 * Solves (1) per sample. Stateful only for the warm start: call `solve` with successive p values.
 * `maxIterations` exists so tests can force the bisection fallback.
 */
export class DiodeNodeSolver {
  /** How many solves ended in the bisection fallback. */
  fallbacks = 0;
  /** dv/dp at the last solution (exact: 1 / (G + di_d/dv)). */
  slope: number;

  private readonly conductance: number;
  private readonly positive: Side;
  private readonly negative: Side;
  private readonly slopeAtZero: number;
  private readonly maxIterations: number;
  private lastP = 0;
  private lastV = 0;

  constructor(network: DiodeNetwork, conductanceSiemens: number, maxIterations = MAX_ITERATIONS) {
    this.conductance = conductanceSiemens;
    this.positive = sideOf(network.up, network.down);
    this.negative = sideOf(network.down, network.up);
    this.slopeAtZero = 1 / (conductanceSiemens + networkConductanceAtZero(network));
    this.slope = this.slopeAtZero;
    this.maxIterations = maxIterations;
  }

  /** Forget the warm start (back to the quiescent point). */
  reset(): void {
    this.lastP = 0;
    this.lastV = 0;
    this.slope = this.slopeAtZero;
  }

  /** The node voltage v with G v + i_d(v) = p. */
  solve(p: number): number {
    const guess = this.lastV + this.slope * (p - this.lastP);
    this.lastP = p;
    if (p === 0) {
      this.slope = this.slopeAtZero;
      this.lastV = 0;
      return 0;
    }
    // Solve the mirror image for p < 0, so that q > 0 and the root v >= 0.
    const sign = p > 0 ? 1 : -1;
    const side = p > 0 ? this.positive : this.negative;
    const q = sign * p;
    const v = sign * this.solveSide(q, sign * guess, side);
    this.lastV = v;
    return v;
  }

  /**
   * Root of F(u) = G v(u) + i_f(u) + i_r(v(u)) - q for q > 0; returns v >= 0 and sets `slope`.
   * One loop, all arithmetic inline (no per-iteration calls): Newton steps first, then, if they
   * have not converged after `maxIterations`, bisection on the bracket (the fallback).
   */
  private solveSide(q: number, guessVolts: number, side: Side): number {
    const conductance = this.conductance;
    const forwardIs = side.forwardIs;
    const forwardN = side.forwardN;
    const forwardR = side.forwardR;
    const reverseIs = side.reverseIs;
    const reverseN = side.reverseN;
    const maxStep = STEP_LIMIT_EMISSIONS * forwardN;
    const reverseSaturatedVolts = REVERSE_SATURATED_EMISSIONS * reverseN;
    const newtonIterations = this.maxIterations;
    let lo = 0;
    let hi = q / conductance;
    if (forwardIs > 0) hi = Math.min(hi, forwardN * Math.log1p(q / forwardIs));
    // The junction voltage never exceeds the node voltage, so the guess for v is one for u too.
    let u = guessVolts > lo ? (guessVolts < hi ? guessVolts : hi) : lo;
    let v = 0;
    let dv = 1;
    let dF = conductance;
    for (let iteration = 0; iteration < newtonIterations + MAX_BISECTIONS; iteration++) {
      if (iteration === newtonIterations) {
        this.fallbacks++;
        u = 0.5 * (lo + hi);
      }
      // Forward string (exp is 1 when absent: N = Infinity) and reverse leakage at v(u).
      const e = Math.exp(u / forwardN);
      const current = forwardIs * (e - 1);
      const dCurrent = (forwardIs * e) / forwardN;
      v = u + forwardR * current;
      dv = 1 + forwardR * dCurrent;
      // Beyond REVERSE_SATURATED_EMISSIONS the reverse string carries its full Is (exp < 1e-17).
      const er = v > reverseSaturatedVolts ? 0 : Math.exp(-v / reverseN);
      const F = conductance * v + current + reverseIs * (1 - er) - q;
      dF = conductance * dv + dCurrent + ((reverseIs * er) / reverseN) * dv;
      if (iteration >= newtonIterations) {
        // Bisection fallback.
        if (hi - lo <= TOLERANCE_VOLTS) break;
        if (F > 0) hi = u;
        else lo = u;
        u = 0.5 * (lo + hi);
        continue;
      }
      let step = -F / dF;
      if (Math.abs(step) <= TOLERANCE_VOLTS) {
        // Converged: first-order update of v from this evaluation (the step is below tolerance).
        this.slope = dv / dF;
        return v + dv * step;
      }
      if (F > 0) hi = u;
      else lo = u;
      if (step > maxStep) step = maxStep;
      else if (step < -maxStep) step = -maxStep;
      const next = u + step;
      u = next > lo && next < hi ? next : 0.5 * (lo + hi); // outside the bracket (or NaN): bisect
    }
    this.slope = dv / dF;
    return v;
  }
}
