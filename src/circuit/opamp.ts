/**
 * The real op-amp's limits around an ideal closed loop (docs/models.md, "Named stage types"):
 * - gain-bandwidth: open-loop A(s) = wt / s (wt = 2 pi GBW; the dominant pole's DC gain is so high
 *   that only the product matters in the audio band), so a non-inverting loop with ideal gain
 *   H(s) = 1 + Zf/Zg becomes A / (1 + A / H) = H / (1 + s H / wt);
 * - slew rate: |dv/dt| of the output at most SR (V/s), i.e. SR / fs per sample;
 * - output swing: single supply biased at supply/2, so the output swings from the bias point up to
 *   supply/2 - headroomHigh and down to -(supply/2 - headroomLow) (datasheet "output voltage
 *   swing"), approached through a smooth knee over the last RAIL_KNEE_VOLTS rather than a hard clamp.
 * The limits act on the output of the linear (or diode) loop model; the loop itself is not
 * re-solved during slewing or saturation (a common simplification).
 */
import { requirePositive, UserError } from '../errors.js';
import {
  addPolynomials,
  analog,
  scalePolynomial,
  type AnalogTransferFunction,
  type DigitalTransferFunction,
} from '../dsp/bilinear.js';
import type { CircuitContext, OpampParams } from '../design/types.js';
import { limitInputVolts } from './inputLimit.js';

/** Width of the soft knee below each swing limit (common practice: "the last few hundred mV"). */
export const RAIL_KNEE_VOLTS = 0.3;

/** Samples whose pre-limit value went beyond a swing limit, since the last reset. */
export interface RailMeter {
  readonly railSamples: number;
}

export interface OpampOutputDesign {
  readonly upperVolts: number; // swing limit above the bias point
  readonly lowerVolts: number; // swing limit below the bias point (a positive magnitude)
  readonly upperKneeVolts: number;
  readonly lowerKneeVolts: number;
  readonly maxStepVolts: number; // slew limit per sample (Infinity for the ideal part)
  // Derived once for the output loops: the knees start at the joints; the output lies outside
  // [-lowerJoint, upperJoint] iff |y - jointCentre| > jointHalfWidth (one test per sample).
  readonly upperJoint: number;
  readonly lowerJoint: number;
  readonly jointCentre: number;
  readonly jointHalfWidth: number;
  readonly upperKneeSquared: number;
  readonly lowerKneeSquared: number;
}

/** Validate the part against the supply and precompute the output limits. */
export function designOpampOutput(opamp: OpampParams, ctx: CircuitContext, where: string): OpampOutputDesign {
  const part = `${where} opamp "${opamp.name}"`;
  checkPositiveOrInfinite(opamp.gbwHz, `${part} gbw`, 'Hz');
  checkPositiveOrInfinite(opamp.slewRateVoltsPerSecond, `${part} slewRate`, 'V/s');
  requirePositive(opamp.headroomLowVolts, `${part} headroomLow`, 'V', true);
  requirePositive(opamp.headroomHighVolts, `${part} headroomHigh`, 'V', true);
  requirePositive(ctx.supplyVolts, 'supply', 'V');
  requirePositive(ctx.sampleRate, `${where} sample rate`, 'Hz');
  const half = ctx.supplyVolts / 2;
  const upperVolts = half - opamp.headroomHighVolts;
  const lowerVolts = half - opamp.headroomLowVolts;
  if (!(upperVolts > 0 && lowerVolts > 0)) {
    throw new UserError(
      `${part}: supply ${ctx.supplyVolts} V leaves no output swing (headroom ${opamp.headroomLowVolts} V low, ${opamp.headroomHighVolts} V high); raise the supply`,
    );
  }
  const upperKneeVolts = Math.min(RAIL_KNEE_VOLTS, upperVolts / 2);
  const lowerKneeVolts = Math.min(RAIL_KNEE_VOLTS, lowerVolts / 2);
  const upperJoint = upperVolts - upperKneeVolts;
  const lowerJoint = lowerVolts - lowerKneeVolts;
  return {
    upperVolts,
    lowerVolts,
    upperKneeVolts,
    lowerKneeVolts,
    maxStepVolts: opamp.slewRateVoltsPerSecond / ctx.sampleRate,
    upperJoint,
    lowerJoint,
    jointCentre: (upperJoint - lowerJoint) / 2,
    jointHalfWidth: (upperJoint + lowerJoint) / 2,
    upperKneeSquared: upperKneeVolts * upperKneeVolts,
    lowerKneeSquared: lowerKneeVolts * lowerKneeVolts,
  };
}

function checkPositiveOrInfinite(value: number, where: string, unit: string): void {
  if (value !== Infinity) requirePositive(value, where, unit);
}

/**
 * Closed loop with finite GBW: H / (1 + s H / wt) = N / (D + s N / wt) for H = N / D.
 * With an infinite GBW it is H itself.
 */
export function withGainBandwidth(num: readonly number[], den: readonly number[], gbwHz: number): AnalogTransferFunction {
  if (gbwHz === Infinity) return analog(num, den);
  const wt = 2 * Math.PI * gbwHz;
  return analog(num, addPolynomials(den, [0, ...scalePolynomial(num, 1 / wt)]));
}

/** Highest closed-loop order the fused kernel takes (1 + Zf/Zg with GBW is at most 3). */
const MAX_LOOP_ORDER = 3;

/**
 * The op-amp stage's output path in one pass per sample: input limit (inputLimit.ts), closed-loop
 * response (direct form II transposed, order <= 3, unrolled), slew limit, soft rails. One fused
 * loop rather than the general IIR plus separate passes: at the oversampled rate that is about three
 * times faster (measured), and each of those passes was a full trip through memory.
 *
 * Soft rails: towards a swing limit L with knee width k the output is the input up to L - k, then
 * y = L - k^2 / (k + d), d = x - (L - k): continuous with slope 1 at the joint, reaching L only as x
 * goes to infinity, so the output stays inside the swing. Samples whose slewed value is beyond a
 * limit are counted in `railSamples`.
 */
export class OpampStage implements RailMeter {
  railSamples = 0;
  // Coefficients and state are read (and the state written) by the fused gain-clipper kernel
  // (gainClipperPair.ts) as well as by `process`.
  readonly b = new Float64Array(MAX_LOOP_ORDER + 1);
  readonly a = new Float64Array(MAX_LOOP_ORDER + 1);
  /** Loop state (see `process`): u, s1, s2, the last loop output, then the slew memory. */
  readonly state = new Float64Array(MAX_LOOP_ORDER + 2);

  constructor(
    response: DigitalTransferFunction,
    readonly limits: OpampOutputDesign,
  ) {
    if (response.a.length > MAX_LOOP_ORDER + 1 || response.b.length > MAX_LOOP_ORDER + 1) {
      throw new RangeError(`op-amp loop of order above ${MAX_LOOP_ORDER}`);
    }
    this.b.set(response.b);
    this.a.set(response.a);
  }

  reset(): void {
    this.state.fill(0);
    this.railSamples = 0;
  }

  /**
   * The loop is direct form II transposed (y = b0 x + s0, s0 <- b1 x - a1 y + s1, ...) with s0
   * substituted: y_n = (b0 x_n + u) - a1 y_{n-1}, u = b1 x_{n-1} + s1. Same filter, but the chain
   * from one output to the next is one multiply and one subtraction, so the loop runs at the speed
   * of its arithmetic rather than of that chain. The slew and rail tests are one comparison each
   * on the common path (|step| and |y - centre|): about 25 % faster than two (measured).
   */
  process(block: Float64Array): void {
    const { upperVolts, lowerVolts, upperKneeVolts, lowerKneeVolts, maxStepVolts } = this.limits;
    const { upperJoint, lowerJoint, jointCentre, jointHalfWidth, upperKneeSquared, lowerKneeSquared } = this.limits;
    const b = this.b;
    const a = this.a;
    const b0 = b[0];
    const b1 = b[1];
    const b2 = b[2];
    const b3 = b[3];
    const a1 = a[1];
    const a2 = a[2];
    const a3 = a[3];
    const state = this.state;
    let u = state[0];
    let s1 = state[1];
    let s2 = state[2];
    let loop = state[3];
    let previous = state[4];
    let rail = 0;
    for (let i = 0; i < block.length; i++) {
      const x = limitInputVolts(block[i]);
      loop = b0 * x + u - a1 * loop;
      u = b1 * x + s1;
      s1 = b2 * x + s2 - a2 * loop;
      s2 = b3 * x - a3 * loop;
      let y = loop;
      const step = y - previous;
      if (Math.abs(step) > maxStepVolts) y = step > 0 ? previous + maxStepVolts : previous - maxStepVolts;
      previous = y;
      if (Math.abs(y - jointCentre) > jointHalfWidth) {
        if (y > upperJoint) {
          if (y > upperVolts) rail++;
          y = upperVolts - upperKneeSquared / (upperKneeVolts + (y - upperJoint));
        } else if (y < -lowerJoint) {
          if (y < -lowerVolts) rail++;
          y = -lowerVolts + lowerKneeSquared / (lowerKneeVolts + (-lowerJoint - y));
        }
      }
      block[i] = y;
    }
    state[0] = u;
    state[1] = s1;
    state[2] = s2;
    state[3] = loop;
    state[4] = previous;
    this.railSamples += rail;
  }
}
