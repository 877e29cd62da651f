/**
 * A `circuit` stage: any schematic, solved by the circuit core. `designCircuitStage` assembles the
 * netlist at the design's knob positions, finds the DC operating point and builds the DK model at
 * the stage's rate; `createCircuitStage` runs it; `circuitStageResponse` is the analog circuit's
 * small-signal response at the operating point. See docs/models.md.
 */
import type { CircuitContext, CircuitStage } from '../design/types.js';
import { assembleCircuit } from '../netlist/assemble.js';
import { buildDkModel, type DkModel } from '../solver/dkModel.js';
import { DkProcessor } from '../solver/dkProcessor.js';
import { buildMna, type MnaSystem } from '../solver/mna.js';
import { solveOperatingPoint, type OperatingPoint } from '../solver/operatingPoint.js';
import { smallSignalResponse, type ComplexGain } from '../solver/smallSignal.js';

export interface CircuitStageDesign {
  system: MnaSystem;
  operatingPoint: OperatingPoint;
  model: DkModel;
}

/** The MNA system and operating point of a circuit stage (no discretisation: what `check` and the response need). */
export function analyseCircuitStage(stage: CircuitStage, ctx: CircuitContext, knobs: Readonly<Record<string, number>>): { system: MnaSystem; operatingPoint: OperatingPoint } {
  const build = (supplyScale: number): MnaSystem => buildMna(assembleCircuit(stage, ctx, knobs, supplyScale));
  const system = build(1);
  return { system, operatingPoint: solveOperatingPoint(build) };
}

export function designCircuitStage(stage: CircuitStage, ctx: CircuitContext, knobs: Readonly<Record<string, number>>): CircuitStageDesign {
  const { system, operatingPoint } = analyseCircuitStage(stage, ctx, knobs);
  return { system, operatingPoint, model: buildDkModel(system, operatingPoint, ctx.sampleRate) };
}

export function createCircuitStage(design: CircuitStageDesign): DkProcessor {
  return new DkProcessor(design.model, design.system);
}

/** The analog circuit's response (output over input) at each frequency, linearised at rest. */
export function circuitStageResponse(
  stage: CircuitStage,
  ctx: CircuitContext,
  knobs: Readonly<Record<string, number>>,
  frequenciesHz: readonly number[],
): ComplexGain[] {
  const { system, operatingPoint } = analyseCircuitStage(stage, ctx, knobs);
  return smallSignalResponse(system, operatingPoint, frequenciesHz);
}
