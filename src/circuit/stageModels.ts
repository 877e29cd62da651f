/**
 * One entry per stage type: whether it runs oversampled (nonlinear stages do), how to build its
 * processor, and its small-signal transfer function (what `measure` predicts). The chain only talks
 * to stages through this table.
 */
import { bilinearTransform, type AnalogTransferFunction, type DigitalTransferFunction } from '../dsp/bilinear.js';
import type { CircuitContext, Stage } from '../design/types.js';
import type { Processor } from './processor.js';
import type { ConductionMeter } from './conduction.js';
import { createInputStage, designInputStage, inputStageSmallSignal } from './inputStage.js';
import { createToneStage, designToneStage, toneStageSmallSignal } from './tone.js';
import { createRcFilter, designRcFilter, rcFilterSmallSignal } from './rcFilter.js';
import { createVolumeStage, designVolumeStage, volumeStageSmallSignal } from './volume.js';
import { createGainStage, designGainStage, gainStageSmallSignal } from './gain.js';
import { clipperSmallSignal, createClipper, designClipper } from './clipper.js';

export interface StageProcessor extends Processor {
  /** Present on stages with diodes: how often they conduct. */
  readonly conduction?: ConductionMeter;
}

/** True for the stages that must run at the oversampled rate. */
export function isNonlinearStage(stage: Stage<number>): boolean {
  return stage.type === 'gain' || stage.type === 'clipper';
}

/** Build the processor for one resolved stage; `knobs` gives positions for knob-driven parts. */
export function createStageProcessor(
  stage: Stage<number>,
  ctx: CircuitContext,
  knobs: Record<string, number>,
): StageProcessor {
  switch (stage.type) {
    case 'input':
      return createInputStage(designInputStage(stage, ctx));
    case 'tone':
      return createToneStage(designToneStage(stage, ctx));
    case 'lowpass':
    case 'highpass':
      return createRcFilter(designRcFilter(stage, ctx));
    case 'volume':
      return createVolumeStage(designVolumeStage(stage, knobs[stage.knob] ?? 0.5, ctx));
    case 'gain': {
      const processor = createGainStage(designGainStage(stage, ctx));
      return withConduction(processor, stage.feedbackDiode !== null);
    }
    case 'clipper':
      return withConduction(createClipper(designClipper(stage, ctx)), true);
  }
}

function withConduction(processor: Processor & ConductionMeter, hasDiodes: boolean): StageProcessor {
  return {
    latencySamples: processor.latencySamples,
    process: (block) => processor.process(block),
    reset: () => processor.reset(),
    conduction: hasDiodes ? processor : undefined,
  };
}

/** The analog small-signal H(s) of one resolved stage. */
export function stageSmallSignal(
  stage: Stage<number>,
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
  stage: Stage<number>,
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
