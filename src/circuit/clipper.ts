/**
 * Shunt diode clipper: series resistor R from the input into a node, diode network from the node to
 * the bias point, optional capacitor C across the diodes (Yeh, Abel, Smith, DAFx 2007; docs/models.md):
 *
 *   C dv/dt = (vin - v) / R - i_d(v)          (with C)
 *   v + R i_d(v) = vin                         (without C: memoryless)
 *
 * i.e. the shared diode node (diodeNode.ts) driven by j = vin / R with G_r = 1 / R. The output is the
 * node voltage (the stage after it is assumed to be buffered).
 */
import { requirePositive } from '../errors.js';
import { analog, type AnalogTransferFunction } from '../dsp/bilinear.js';
import type { CircuitContext, ClipperStage } from '../design/types.js';
import type { ConductionMeter } from '../dsp/conduction.js';
import { diodeString, validateDiode } from './diode.js';
import { DiodeNode, designDiodeNode, type DiodeNodeDesign, type DiodeSolverKind } from './diodeNode.js';
import { networkConductanceAtZero, type DiodeNetwork } from './diodeNodeSolver.js';
import type { Processor } from '../dsp/processor.js';

export interface ClipperDesign {
  readonly stageId: string;
  readonly seriesOhms: number;
  readonly capFarads: number | null;
  readonly sampleRate: number;
  /** 'table' (default, fast) or 'newton' (plain per-sample Newton-Raphson, the reference). */
  readonly solver: DiodeSolverKind;
  readonly node: DiodeNodeDesign;
}

export interface ClipperOptions {
  solver?: DiodeSolverKind;
}

function clipperNetwork(spec: ClipperStage<number>, ctx: CircuitContext): DiodeNetwork {
  const where = `stage "${spec.id}"`;
  validateDiode(spec.diode, spec.up, `${where} diode (up)`);
  validateDiode(spec.downDiode, spec.down, `${where} downDiode (down)`);
  return {
    up: diodeString(spec.diode, spec.up, ctx.temperatureC),
    down: diodeString(spec.downDiode, spec.down, ctx.temperatureC),
  };
}

function validateClipper(spec: ClipperStage<number>, ctx: CircuitContext): void {
  const where = `stage "${spec.id}"`;
  requirePositive(spec.series, `${where} series`, 'ohm');
  if (spec.cap !== null) requirePositive(spec.cap, `${where} cap`, 'F');
  requirePositive(ctx.sampleRate, `${where} sample rate`, 'Hz');
  requirePositive(ctx.supplyVolts, 'supply', 'V');
}

/**
 * Validate and precompute. The expected drive is half the supply across R (an op-amp before the
 * clipper swings at most that far from the bias point); the solver table covers four times that
 * (diodeNode.ts) and larger inputs are solved by Newton.
 */
export function designClipper(spec: ClipperStage<number>, ctx: CircuitContext, options: ClipperOptions = {}): ClipperDesign {
  validateClipper(spec, ctx);
  const network = clipperNetwork(spec, ctx);
  const seriesSiemens = 1 / spec.series;
  return {
    stageId: spec.id,
    seriesOhms: spec.series,
    capFarads: spec.cap,
    sampleRate: ctx.sampleRate,
    solver: options.solver ?? 'table',
    node: designDiodeNode(network, seriesSiemens, spec.cap, ctx.sampleRate, (ctx.supplyVolts / 2) * seriesSiemens),
  };
}

export function createClipper(design: ClipperDesign): Processor & ConductionMeter {
  const node = new DiodeNode(design.node, design.solver);
  const seriesSiemens = 1 / design.seriesOhms;
  return {
    latencySamples: 0,
    get conductingSamples(): number {
      return node.conductingSamples;
    },
    get countedSamples(): number {
      return node.countedSamples;
    },
    reset(): void {
      node.reset();
    },
    process(block: Float64Array): void {
      node.process(block, seriesSiemens);
    },
  };
}

/**
 * Small-signal H(s) = 1 / (1 + R g0 + s R C), g0 the diodes' conductance at 0 V. Its bilinear
 * transform (no pre-warp) is exactly what the trapezoidal clipper does for vanishing inputs.
 */
export function clipperSmallSignal(spec: ClipperStage<number>, ctx: CircuitContext): AnalogTransferFunction {
  validateClipper(spec, ctx);
  const g0 = networkConductanceAtZero(clipperNetwork(spec, ctx));
  const rc = spec.series * (spec.cap ?? 0);
  return analog([1], rc > 0 ? [1 + spec.series * g0, rc] : [1 + spec.series * g0]);
}
