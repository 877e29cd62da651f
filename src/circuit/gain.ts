/**
 * Non-inverting op-amp gain stage (docs/models.md, "Named stage types").
 *
 * Linear loop: ideal gain H(s) = 1 + Zf/Zg with Zf = Rf || 1/(s Cf) and Zg = Rg + 1/(s Cg); the
 * real part's GBW makes it H / (1 + s H / wt) (opamp.ts), a rational function of order <= 3,
 * discretised by the bilinear transform (no pre-warp). Unity buffer when rf = 0 or rg is absent.
 *
 * Feedback diodes across Rf: the ideal op-amp holds v- = vin, so the current through Zg is the
 * linear function i_g = Yg(s) vin (Yg = s Cg / (1 + s Rg Cg), or 1/Rg), and it all flows through the
 * feedback network, whose voltage v_f obeys
 *   Cf dv_f/dt = i_g - v_f / Rf - i_d(v_f)
 * the diode node of diodeNode.ts driven by j = i_g with G_r = 1/Rf. Output = vin + v_f. The finite
 * GBW is then applied as one pole at the loop's small-signal bandwidth wt / (1 + Rf'/Rg), where
 * Rf' = Rf in parallel with the diodes' resistance at 0 V (when the diodes conduct, the true loop
 * gain falls and its bandwidth rises, so this is the conservative end).
 *
 * Then slew rate and soft rails (opamp.ts) for every variant.
 */
import { requirePositive } from '../errors.js';
import {
  addPolynomials,
  analog,
  bilinearTransform,
  multiplyPolynomials,
  type AnalogTransferFunction,
  type DigitalTransferFunction,
} from '../dsp/bilinear.js';
import { createIirFilter } from '../dsp/iir.js';
import type { CircuitContext, GainStage } from '../design/types.js';
import type { ConductionMeter } from '../dsp/conduction.js';
import { diodeString, validateDiode } from './diode.js';
import { DiodeNode, designDiodeNode, type DiodeNodeDesign, type DiodeSolverKind } from './diodeNode.js';
import { networkConductanceAtZero, type DiodeNetwork } from './diodeNodeSolver.js';
import { limitInputVolts } from './inputLimit.js';
import { OpampStage, designOpampOutput, withGainBandwidth, type OpampOutputDesign, type RailMeter } from './opamp.js';
import type { Processor } from '../dsp/processor.js';

export interface GainStageDesign {
  readonly stageId: string;
  readonly sampleRate: number;
  /** Linear loop with GBW (no diodes), or the GBW pole after the diode loop. */
  readonly response: DigitalTransferFunction;
  /** Present when diodes sit across Rf. */
  readonly feedback: {
    readonly admittance: DigitalTransferFunction; // Yg: vin -> i_g
    readonly node: DiodeNodeDesign;
  } | null;
  /** 'table' (default) or 'newton' for the feedback-diode solver. */
  readonly solver: DiodeSolverKind;
  readonly output: OpampOutputDesign;
}

export interface GainStageOptions {
  solver?: DiodeSolverKind;
}

/** Rational H = num / den in ascending powers of s. */
interface Rational {
  num: number[];
  den: number[];
}

function validateGainStage(spec: GainStage<number>, ctx: CircuitContext): void {
  const where = `stage "${spec.id}"`;
  requirePositive(spec.rf, `${where} rf`, 'ohm', true);
  if (spec.rg !== null) requirePositive(spec.rg, `${where} rg`, 'ohm');
  if (spec.cg !== null) requirePositive(spec.cg, `${where} cg`, 'F');
  if (spec.cf !== null) requirePositive(spec.cf, `${where} cf`, 'F');
  if (spec.feedbackDiode !== null) {
    validateDiode(spec.feedbackDiode, spec.feedbackUp, `${where} feedbackDiode (feedbackUp)`);
    validateDiode(spec.feedbackDiode, spec.feedbackDown, `${where} feedbackDiode (feedbackDown)`);
  }
  requirePositive(ctx.sampleRate, `${where} sample rate`, 'Hz');
}

function isUnityBuffer(spec: GainStage<number>): boolean {
  return spec.rf === 0 || spec.rg === null;
}

/** The feedback diodes, or null when there are none (or they sit across a short). */
function feedbackNetwork(spec: GainStage<number>, ctx: CircuitContext): DiodeNetwork | null {
  const diode = spec.feedbackDiode;
  if (diode === null || isUnityBuffer(spec) || spec.feedbackUp + spec.feedbackDown === 0) return null;
  return {
    up: diodeString(diode, spec.feedbackUp, ctx.temperatureC),
    down: diodeString(diode, spec.feedbackDown, ctx.temperatureC),
  };
}

/** Ideal loop 1 + Zf/Zg = (Df Ng + Nf Dg) / (Df Ng) with Zf = Nf/Df, Zg = Ng/Dg. */
function idealGain(rfOhms: number, rgOhms: number, cg: number | null, cf: number | null): Rational {
  const nf = [rfOhms];
  const df = cf === null ? [1] : [1, rfOhms * cf];
  const ng = cg === null ? [rgOhms] : [1, rgOhms * cg];
  const dg = cg === null ? [1] : [0, cg];
  const den = multiplyPolynomials(df, ng);
  return { num: addPolynomials(den, multiplyPolynomials(nf, dg)), den };
}

/** Yg(s): current through Rg (+ Cg) per volt at the inverting input. */
function groundLegAdmittance(rgOhms: number, cg: number | null): AnalogTransferFunction {
  return cg === null ? analog([1 / rgOhms], [1]) : analog([0, cg], [1, rgOhms * cg]);
}

/** Rf in parallel with the diodes' small-signal resistance at 0 V. */
function effectiveFeedbackOhms(rfOhms: number, network: DiodeNetwork): number {
  return 1 / (1 / rfOhms + networkConductanceAtZero(network));
}

/** One pole at wt / (1 + Rf'/Rg): the GBW limit applied after the diode loop. */
function gainBandwidthPole(gbwHz: number, midbandGain: number): AnalogTransferFunction {
  return withGainBandwidth([1], [1], gbwHz / midbandGain);
}

/** The analog small-signal model the processor discretises (diodes linearised at 0 V). */
function smallSignalParts(spec: GainStage<number>, ctx: CircuitContext): { loop: AnalogTransferFunction; network: DiodeNetwork | null } {
  const gbwHz = spec.opamp.gbwHz;
  if (isUnityBuffer(spec)) return { loop: withGainBandwidth([1], [1], gbwHz), network: null };
  const rg = spec.rg as number;
  const network = feedbackNetwork(spec, ctx);
  if (network === null) {
    const ideal = idealGain(spec.rf, rg, spec.cg, spec.cf);
    return { loop: withGainBandwidth(ideal.num, ideal.den, gbwHz), network };
  }
  const rfEffective = effectiveFeedbackOhms(spec.rf, network);
  const ideal = idealGain(rfEffective, rg, spec.cg, spec.cf);
  const pole = gainBandwidthPole(gbwHz, 1 + rfEffective / rg);
  return {
    loop: analog(multiplyPolynomials(ideal.num, pole.b), multiplyPolynomials(ideal.den, pole.a)),
    network,
  };
}

/**
 * Small-signal H(s) of the stage: the linear loop with GBW, or with feedback diodes the loop with Rf
 * in parallel with their 0 V resistance times the GBW pole. Its bilinear transform (no pre-warp) is
 * what the processor does for small inputs.
 */
export function gainStageSmallSignal(spec: GainStage<number>, ctx: CircuitContext): AnalogTransferFunction {
  validateGainStage(spec, ctx);
  return smallSignalParts(spec, ctx).loop;
}

/**
 * Validate and precompute. The expected ground-leg current is half the supply across Rg (the
 * inputs stay within the supply, biased at its middle); the feedback-diode table covers four times
 * that (diodeNode.ts) and larger currents go to Newton.
 */
export function designGainStage(spec: GainStage<number>, ctx: CircuitContext, options: GainStageOptions = {}): GainStageDesign {
  validateGainStage(spec, ctx);
  const where = `stage "${spec.id}"`;
  const output = designOpampOutput(spec.opamp, ctx, where);
  const { loop, network } = smallSignalParts(spec, ctx);
  let feedback: GainStageDesign['feedback'] = null;
  let response = bilinearTransform(loop, ctx.sampleRate);
  if (network !== null) {
    const rg = spec.rg as number;
    const rfEffective = effectiveFeedbackOhms(spec.rf, network);
    response = bilinearTransform(gainBandwidthPole(spec.opamp.gbwHz, 1 + rfEffective / rg), ctx.sampleRate);
    feedback = {
      admittance: bilinearTransform(groundLegAdmittance(rg, spec.cg), ctx.sampleRate),
      node: designDiodeNode(network, 1 / spec.rf, spec.cf, ctx.sampleRate, ctx.supplyVolts / 2 / rg),
    };
  }
  return { stageId: spec.id, sampleRate: ctx.sampleRate, response, feedback, solver: options.solver ?? 'table', output };
}

export function createGainStage(design: GainStageDesign): Processor & ConductionMeter & RailMeter {
  const output = new OpampStage(design.response, design.output);
  const feedback = design.feedback;
  const admittance = feedback === null ? null : createIirFilter(feedback.admittance);
  const node = feedback === null ? null : new DiodeNode(feedback.node, design.solver);
  // Scratch for i_g and then v_f; replaced only when the block length changes.
  let scratch = new Float64Array(0);
  let feedbackVolts = scratch;
  return {
    latencySamples: 0,
    get conductingSamples(): number {
      return node?.conductingSamples ?? 0;
    },
    get countedSamples(): number {
      return node?.countedSamples ?? 0;
    },
    get railSamples(): number {
      return output.railSamples;
    },
    reset(): void {
      output.reset();
      admittance?.reset();
      node?.reset();
    },
    process(block: Float64Array): void {
      const n = block.length;
      if (admittance !== null && node !== null) {
        for (let i = 0; i < n; i++) block[i] = limitInputVolts(block[i]);
        if (feedbackVolts.length !== n) {
          if (scratch.length < n) scratch = new Float64Array(n);
          feedbackVolts = scratch.subarray(0, n);
        }
        feedbackVolts.set(block);
        admittance.process(feedbackVolts); // vin -> i_g
        node.process(feedbackVolts, 1); // i_g -> v_f
        for (let i = 0; i < n; i++) block[i] += feedbackVolts[i];
      }
      output.process(block); // closed loop (or GBW pole), slew, rails
    },
  };
}
