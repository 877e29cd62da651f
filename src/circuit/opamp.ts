/**
 * The real op-amp's limits around an ideal closed loop (BRIEF sections 1 and 2):
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
import { UserError } from '../errors.js';
import { addPolynomials, analog, scalePolynomial, type AnalogTransferFunction } from '../dsp/bilinear.js';
import { requirePositive } from '../dsp/firstOrderSection.js';
import type { CircuitContext, OpampParams } from '../design/types.js';

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
  return {
    upperVolts,
    lowerVolts,
    upperKneeVolts: Math.min(RAIL_KNEE_VOLTS, upperVolts / 2),
    lowerKneeVolts: Math.min(RAIL_KNEE_VOLTS, lowerVolts / 2),
    maxStepVolts: opamp.slewRateVoltsPerSecond / ctx.sampleRate,
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

/**
 * Soft saturation towards a limit L with knee width k: identity up to L - k, then
 * y = L - k^2 / (k + d), d = x - (L - k): continuous with slope 1 at the joint, rising to L only
 * as x goes to infinity, so the output stays inside the swing.
 */
function softLimit(x: number, limit: number, knee: number): number {
  const d = x - (limit - knee);
  return d > 0 ? limit - (knee * knee) / (knee + d) : x;
}

/** Slew limit then soft rails, in place, with a running count of samples beyond the swing. */
export class OpampOutput implements RailMeter {
  railSamples = 0;
  private previous = 0;

  constructor(private readonly design: OpampOutputDesign) {}

  reset(): void {
    this.previous = 0;
    this.railSamples = 0;
  }

  process(block: Float64Array): void {
    const { upperVolts, lowerVolts, upperKneeVolts, lowerKneeVolts, maxStepVolts } = this.design;
    let previous = this.previous;
    let rail = 0;
    for (let i = 0; i < block.length; i++) {
      let x = block[i];
      const step = x - previous;
      if (step > maxStepVolts) x = previous + maxStepVolts;
      else if (step < -maxStepVolts) x = previous - maxStepVolts;
      previous = x;
      if (x > upperVolts || x < -lowerVolts) rail++;
      block[i] = x >= 0 ? softLimit(x, upperVolts, upperKneeVolts) : -softLimit(-x, lowerVolts, lowerKneeVolts);
    }
    this.previous = previous;
    this.railSamples += rail;
  }
}
