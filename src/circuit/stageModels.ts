/**
 * One entry per stage type: whether it runs oversampled (nonlinear stages do), how to build its
 * processor, and its small-signal transfer function (what `measure` predicts). The chain only talks
 * to stages through this table.
 */
import { bilinearTransform, type AnalogTransferFunction, type DigitalTransferFunction } from '../dsp/bilinear.js';
import { analogResponse, digitalResponse } from '../dsp/bilinear.js';
import type { CircuitContext, CircuitStage, GainStage, Stage } from '../design/types.js';
import { openCircuitTimeConstantSum, type ComplexGain } from '../solver/smallSignal.js';
import { analyseCircuitStage, circuitStageResponse, createCircuitStage, designCircuitStage, type CircuitStageDesign } from './circuitStage.js';
import type { Processor } from '../dsp/processor.js';
import type { ConductionMeter } from '../dsp/conduction.js';
import { createInputStage, designInputStage, inputStageSmallSignal } from './inputStage.js';
import { createToneStage, designToneStage, toneStageSmallSignal } from './tone.js';
import { createRcFilter, designRcFilter, rcFilterSmallSignal } from './rcFilter.js';
import { createVolumeStage, designVolumeStage, volumeStageSmallSignal } from './volume.js';
import { createGainStage, designGainStage, gainStageSmallSignal, type GainStageDesign } from './gain.js';
import { clipperSmallSignal, createClipper, designClipper, type ClipperDesign } from './clipper.js';
import { canPairWithClipper, createGainClipperPair } from './gainClipperPair.js';
import { warmUpKernel } from './kernelWarmUp.js';
import type { OpampOutputDesign } from './opamp.js';

export interface StageProcessor extends Processor {
  /** Present on stages with diodes: how often they conduct. */
  readonly conduction?: ConductionMeter;
}

/** The named stage types, whose small-signal model is a rational H(s). */
export type NamedStage = Exclude<Stage<number>, CircuitStage>;

/** True for the stages that must run at the oversampled rate (circuit stages always do). */
export function isNonlinearStage(stage: Stage<number>): boolean {
  return stage.type === 'gain' || stage.type === 'clipper' || stage.type === 'circuit';
}

/** Build the processor for one resolved stage; `knobs` gives positions for knob-driven parts. */
export function createStageProcessor(
  stage: Stage<number>,
  ctx: CircuitContext,
  knobs: Record<string, number>,
): StageProcessor {
  switch (stage.type) {
    case 'circuit':
      return circuitProcessorFactory(designCircuitStage(stage, ctx, knobs))();
    case 'input':
      return createInputStage(designInputStage(stage, ctx));
    case 'tone':
      return createToneStage(designToneStage(stage, ctx));
    case 'lowpass':
    case 'highpass':
      return createRcFilter(designRcFilter(stage, ctx));
    case 'volume':
      return createVolumeStage(designVolumeStage(stage, knobs[stage.knob] ?? 0.5, ctx));
    case 'gain':
      return gainProcessorFactory(stage, designGainStage(stage, ctx))();
    case 'clipper':
      return clipperProcessorFactory(designClipper(stage, ctx))();
  }
}

// Nonlinear stages are designed once (diode tables take a while) and then made by a factory: the
// kernel warm-up (kernelWarmUp.ts) runs a throwaway processor before the real one.
function gainProcessorFactory(stage: GainStage<number>, design: GainStageDesign): () => StageProcessor {
  return () => {
    const processor = createGainStage(design);
    return withConduction(processor, stage.feedbackDiode !== null ? processor : undefined);
  };
}

function circuitProcessorFactory(design: CircuitStageDesign): () => StageProcessor {
  return () => {
    const processor = createCircuitStage(design);
    return withConduction(processor, processor.hasDiodes ? processor : undefined);
  };
}

function clipperProcessorFactory(design: ClipperDesign): () => StageProcessor {
  return () => {
    const processor = createClipper(design);
    return withConduction(processor, processor);
  };
}

/**
 * A warmed-up processor from `create` (kernelWarmUp.ts): driven to the supply voltage (past any
 * rail, inside the diode tables), held long enough for the op-amp, if any, to slew into each rail.
 */
function warmedUp<P extends Processor>(create: () => P, ctx: CircuitContext, opamp?: OpampOutputDesign): P {
  const swingVolts = 2 * ctx.supplyVolts;
  const settleSamples = opamp && Number.isFinite(opamp.maxStepVolts) ? swingVolts / opamp.maxStepVolts + WARM_UP_MARGIN_SAMPLES : WARM_UP_MARGIN_SAMPLES;
  warmUpKernel(create, { driveVolts: ctx.supplyVolts, settleSamples });
  return create();
}

const WARM_UP_MARGIN_SAMPLES = 64;

/** The processors of consecutive stages at one rate: one per stage, and what runs them. */
export interface StageRun {
  /** One per stage, in order (for ids and meters); each also runs alone. */
  readonly stages: StageProcessor[];
  /** What processes a block, in order: the stages, with a fused pair for each diode-less gain stage directly followed by a clipper (gainClipperPair.ts). */
  readonly runners: Processor[];
}

/** Build the processors of consecutive stages that run at the same rate `ctx.sampleRate`. */
export function createStageRun(stages: readonly Stage<number>[], ctx: CircuitContext, knobs: Record<string, number>): StageRun {
  const run: StageRun = { stages: [], runners: [] };
  for (let i = 0; i < stages.length; i++) {
    const stage = stages[i];
    const next = stages[i + 1];
    let processor: StageProcessor;
    if (stage.type === 'gain') {
      const gain = designGainStage(stage, ctx);
      if (next?.type === 'clipper' && canPairWithClipper(gain)) {
        const clipper = designClipper(next, ctx);
        const pair = warmedUp(() => createGainClipperPair(gain, clipper), ctx, gain.output);
        run.stages.push(withConduction(pair.gainStage, undefined));
        run.stages.push(withConduction(pair.clipperStage, pair.clipperStage));
        run.runners.push(pair);
        i++;
        continue;
      }
      processor = warmedUp(gainProcessorFactory(stage, gain), ctx, gain.output);
    } else if (stage.type === 'clipper') {
      processor = warmedUp(clipperProcessorFactory(designClipper(stage, ctx)), ctx);
    } else if (stage.type === 'circuit') {
      processor = warmedUp(circuitProcessorFactory(designCircuitStage(stage, ctx, knobs)), ctx);
    } else {
      processor = createStageProcessor(stage, ctx, knobs);
    }
    run.stages.push(processor);
    run.runners.push(processor);
  }
  return run;
}

function withConduction(processor: Processor, conduction: ConductionMeter | undefined): StageProcessor {
  return {
    latencySamples: processor.latencySamples,
    process: (block) => processor.process(block),
    reset: () => processor.reset(),
    conduction,
  };
}

/** The analog small-signal H(s) of one resolved named stage. */
export function stageSmallSignal(
  stage: NamedStage,
  ctx: CircuitContext,
  knobs: Record<string, number>,
): AnalogTransferFunction {
  switch (stage.type) {
    case 'input':
      return inputStageSmallSignal(stage, ctx);
    case 'tone':
      return toneStageSmallSignal(stage, ctx);
    case 'lowpass':
    case 'highpass':
      return rcFilterSmallSignal(stage, ctx);
    case 'volume':
      return volumeStageSmallSignal(stage, knobs[stage.knob] ?? 0.5);
    case 'gain':
      return gainStageSmallSignal(stage, ctx);
    case 'clipper':
      return clipperSmallSignal(stage, ctx);
  }
}

/**
 * The digital small-signal H(z) a resolved stage runs at `ctx.sampleRate`: the linear stages' own
 * (pre-warped) designs, and for the nonlinear stages the plain bilinear transform of their
 * small-signal H(s), which is what their discretisation reduces to at vanishing level.
 */
export function stageDigitalTransferFunction(
  stage: NamedStage,
  ctx: CircuitContext,
  knobs: Record<string, number>,
): DigitalTransferFunction {
  switch (stage.type) {
    case 'input':
      return designInputStage(stage, ctx);
    case 'tone':
      return designToneStage(stage, ctx);
    case 'lowpass':
    case 'highpass':
      return designRcFilter(stage, ctx);
    case 'volume':
      return designVolumeStage(stage, knobs[stage.knob] ?? 0.5, ctx);
    case 'gain':
    case 'clipper':
      return bilinearTransform(stageSmallSignal(stage, ctx, knobs), ctx.sampleRate);
  }
}

function complexGains(frequenciesHz: readonly number[], at: (hz: number) => [number, number]): ComplexGain[] {
  return frequenciesHz.map((hz) => {
    const [re, im] = at(hz);
    return { re, im };
  });
}

/**
 * The response `measure` predicts for one stage at each frequency: for a circuit stage the analog
 * circuit linearised at rest; for a named stage its discretised H(z) at the rate it runs at
 * (`ctx.sampleRate`).
 */
export function stagePredictedResponse(stage: Stage<number>, ctx: CircuitContext, knobs: Record<string, number>, frequenciesHz: readonly number[]): ComplexGain[] {
  if (stage.type === 'circuit') return circuitStageResponse(stage, ctx, knobs, frequenciesHz);
  const tf = stageDigitalTransferFunction(stage, ctx, knobs);
  return complexGains(frequenciesHz, (hz) => digitalResponse(tf, hz));
}

/** The stage's analog small-signal gain at each frequency (circuit: linearised at rest). */
export function stageAnalogResponse(stage: Stage<number>, ctx: CircuitContext, knobs: Record<string, number>, frequenciesHz: readonly number[]): ComplexGain[] {
  if (stage.type === 'circuit') return circuitStageResponse(stage, ctx, knobs, frequenciesHz);
  const tf = stageSmallSignal(stage, ctx, knobs);
  return complexGains(frequenciesHz, (hz) => analogResponse(tf, hz));
}

/**
 * Sum of the stage's small-signal time constants, seconds: a1 / a0 of its denominator
 * 1 + a1 s + ... (Vieta), an upper bound on its slowest time constant.
 */
export function stageTimeConstantSum(stage: Stage<number>, ctx: CircuitContext, knobs: Record<string, number>): number {
  if (stage.type === 'circuit') {
    const { system, operatingPoint } = analyseCircuitStage(stage, ctx, knobs);
    return openCircuitTimeConstantSum(system, operatingPoint);
  }
  const { a } = stageSmallSignal(stage, ctx, knobs);
  return a.length > 1 && a[0] !== 0 ? Math.abs(a[1] / a[0]) : 0;
}
