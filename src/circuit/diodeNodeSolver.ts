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
  // Results of the last `evaluate` (fields rather than a returned object: no allocation).
  private evalV = 0;
  private evalDv = 1;
  private evalF = 0;
  private evalDf = 1;

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
    let v: number;
    if (p > 0) v = this.solveSide(p, guess, this.positive);
    else if (p < 0) v = -this.solveSide(-p, -guess, this.negative);
    else {
      v = 0;
      this.slope = this.slopeAtZero;
    }
    this.lastP = p;
    this.lastV = v;
    return v;
  }

  /** Root for q > 0 on one side; returns v >= 0 and sets `slope`. */
  private solveSide(q: number, guessVolts: number, side: Side): number {
    let lo = 0;
    let hi = q / this.conductance;
    if (side.forwardIs > 0) hi = Math.min(hi, side.forwardN * Math.log1p(q / side.forwardIs));
    const maxStep = STEP_LIMIT_EMISSIONS * side.forwardN;
    // The junction voltage never exceeds the node voltage, so the guess for v is one for u too.
    let u = guessVolts > lo ? (guessVolts < hi ? guessVolts : hi) : lo;
    for (let iteration = 0; iteration < this.maxIterations; iteration++) {
      this.evaluate(u, q, side);
      let step = -this.evalF / this.evalDf;
      if (Math.abs(step) <= TOLERANCE_VOLTS) {
        // Converged: first-order update of v from the last evaluation (the step is below tolerance).
        this.slope = this.evalDv / this.evalDf;
        return this.evalV + this.evalDv * step;
      }
      if (this.evalF > 0) hi = u;
      else lo = u;
      if (step > maxStep) step = maxStep;
      else if (step < -maxStep) step = -maxStep;
      const next = u + step;
      u = next > lo && next < hi ? next : 0.5 * (lo + hi); // outside the bracket (or NaN): bisect
    }
    return this.bisect(lo, hi, q, side);
  }

  /** Fallback: plain bisection on the bracket [lo, hi] of u. */
  private bisect(lo: number, hi: number, q: number, side: Side): number {
    this.fallbacks++;
    for (let halving = 0; halving < MAX_BISECTIONS && hi - lo > TOLERANCE_VOLTS; halving++) {
      const mid = 0.5 * (lo + hi);
      this.evaluate(mid, q, side);
      if (this.evalF > 0) hi = mid;
      else lo = mid;
    }
    this.evaluate(0.5 * (lo + hi), q, side);
    this.slope = this.evalDv / this.evalDf;
    return this.evalV;
  }

  /** Residual F(u) = G v + i_f + i_r - q, its derivative, v(u) and dv/du. */
  private evaluate(u: number, q: number, side: Side): void {
    const e = Math.exp(u / side.forwardN); // 1 when the forward string is absent (N = Infinity)
    const current = side.forwardIs * (e - 1);
    const dCurrent = (side.forwardIs * e) / side.forwardN;
    const v = u + side.forwardR * current;
    const dv = 1 + side.forwardR * dCurrent;
    const er = Math.exp(-v / side.reverseN);
    const reverseCurrent = side.reverseIs * (1 - er); // magnitude of the reverse string's leakage
    const dReverse = ((side.reverseIs * er) / side.reverseN) * dv;
    this.evalV = v;
    this.evalDv = dv;
    this.evalF = this.conductance * v + current + reverseCurrent - q;
    this.evalDf = this.conductance * dv + dCurrent + dReverse;
  }
}
