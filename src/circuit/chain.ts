/**
 * The signal chain: the design's stages in order. Linear stages run at the file rate; each run of
 * consecutive nonlinear stages (gain, clipper) forms a segment that runs at `oversample` x the file
 * rate between an upsampler and a downsampler. A diode-less gain stage directly followed by a
 * clipper runs as one fused processor (gainClipperPair.ts); `stages` still lists every stage with
 * its own meters. Processing is in fixed blocks with buffers allocated
 * once, so a render's memory is the audio plus a small constant.
 */
import type { CircuitContext, Design, Stage } from '../design/types.js';
import { createOversampler, type OversampleFactor, type Oversampler } from '../dsp/oversampler.js';
import type { Processor } from '../dsp/processor.js';
import { createStageRun, isNonlinearStage, type StageProcessor } from './stageModels.js';

export const CHAIN_BLOCK_SIZE = 1024;

export interface ChainStageInfo {
  id: string;
  type: Stage['type'];
  processor: StageProcessor;
  oversampled: boolean;
}

interface Segment {
  specs: Stage<number>[];
  runners: Processor[];
  oversampler: Oversampler | null; // null: runs at the file rate
}

export interface Chain {
  readonly stages: readonly ChainStageInfo[];
  /** Samples the chain delays its input by (oversampling filters); compensated by `renderChannel`. */
  readonly latencySamples: number;
  readonly blockSize: number;
  /** Process one block of at most `blockSize` samples in place. */
  process(block: Float64Array): void;
  reset(): void;
}

export interface ChainOptions {
  sampleRate: number;
  oversample: OversampleFactor;
}

export function buildChain(design: Design<number>, options: ChainOptions): Chain {
  const { sampleRate, oversample } = options;
  const blockSize = CHAIN_BLOCK_SIZE;
  const baseContext: CircuitContext = {
    sampleRate,
    supplyVolts: design.supplyVolts,
    temperatureC: design.temperatureC,
  };
  const fastContext: CircuitContext = { ...baseContext, sampleRate: sampleRate * oversample };

  const segments: Segment[] = [];
  for (const stage of design.stages) {
    const oversampled = isNonlinearStage(stage) && oversample > 1;
    const last = segments[segments.length - 1];
    if (last && (last.oversampler !== null) === oversampled) {
      last.specs.push(stage);
    } else {
      segments.push({
        specs: [stage],
        runners: [],
        oversampler: oversampled ? createOversampler(oversample, blockSize, sampleRate) : null,
      });
    }
  }
  const stages: ChainStageInfo[] = [];
  for (const segment of segments) {
    const oversampled = segment.oversampler !== null;
    const run = createStageRun(segment.specs, oversampled ? fastContext : baseContext, design.knobs);
    segment.runners = run.runners;
    segment.specs.forEach((spec, i) => stages.push({ id: spec.id, type: spec.type, processor: run.stages[i], oversampled }));
  }

  const latencySamples = segments.reduce(
    (sum, segment) =>
      sum +
      (segment.oversampler ? segment.oversampler.latencyBaseSamples : 0) +
      segment.runners.reduce((inner, runner) => inner + runner.latencySamples, 0),
    0,
  );

  return {
    stages,
    latencySamples,
    blockSize,
    process(block: Float64Array): void {
      for (const segment of segments) {
        if (segment.oversampler === null) {
          for (const runner of segment.runners) runner.process(block);
          continue;
        }
        // The oversampler's own block: downsampling reads it without a copy.
        const fast = segment.oversampler.oversampledBlock(block.length);
        segment.oversampler.upsample(block, fast);
        for (const runner of segment.runners) runner.process(fast);
        segment.oversampler.downsample(fast, block);
      }
    },
    reset(): void {
      for (const segment of segments) {
        segment.oversampler?.reset();
        for (const runner of segment.runners) runner.reset();
      }
    },
  };
}
