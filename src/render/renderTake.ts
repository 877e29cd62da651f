/**
 * Render one decoded take through a resolved design: calibrate to volts, run every channel through
 * a fresh chain, and gather the level figures the sidecar reports.
 */
import type { DecodedWav } from '../audio/wavRead.js';
import { toVolts, type CalibrationScale } from '../audio/calibration.js';
import type { Design } from '../design/types.js';
import { buildChain, type OversampleFactor } from '../circuit/chain.js';
import { renderChannel, type RenderProgress } from '../circuit/renderChannel.js';
import { findOvers, measureLevels, voltsToDbfs, type OverReport } from './levels.js';

export interface RenderTakeOptions {
  oversample: OversampleFactor;
  scale: CalibrationScale;
  onProgress?: RenderProgress;
}

export interface LevelFigures {
  peakVolts: number;
  peakDbfs: number;
  rmsVolts: number;
  rmsDbfs: number;
  crestDb: number;
}

export interface RenderSummary {
  take: string;
  design: string;
  sampleRate: number;
  channels: number;
  seconds: number;
  oversample: OversampleFactor;
  /** Volts peak that digital full scale stands for, in and out. */
  voltsAtFullScale: number;
  input: LevelFigures;
  output: LevelFigures;
  /** Per stage with diodes: share of (oversampled) samples with the diodes conducting, 0..1. */
  conducting: Record<string, number>;
  overs: OverReport;
  warnings: string[];
}

export interface RenderedTake {
  /** Output in volts, one array per channel, same length as the input. */
  volts: Float64Array[];
  summary: RenderSummary;
}

/** A render this much hotter (RMS) than its input earns a loudness warning. */
const HOT_RENDER_DB = 12;

function levelFigures(channels: readonly Float64Array[], voltsAtFullScale: number): LevelFigures {
  const levels = measureLevels(channels);
  return {
    peakVolts: levels.peakVolts,
    peakDbfs: voltsToDbfs(levels.peakVolts, voltsAtFullScale),
    rmsVolts: levels.rmsVolts,
    rmsDbfs: voltsToDbfs(levels.rmsVolts, voltsAtFullScale),
    crestDb: levels.crestDb,
  };
}

export function renderTake(design: Design<number>, wav: DecodedWav, options: RenderTakeOptions): RenderedTake {
  const calibrated = toVolts(wav.channels, options.scale, wav.path);
  const voltsAtFullScale = calibrated.voltsPerFullScale;
  const chain = buildChain(design, { sampleRate: wav.sampleRate, oversample: options.oversample });
  const conductingCounts = new Map<string, { conducting: number; counted: number }>();
  const totalSamples = calibrated.channels.length * wav.frames;
  const volts = calibrated.channels.map((channel, index) => {
    const offset = index * wav.frames;
    const progress = options.onProgress;
    const rendered = renderChannel(chain, channel, progress ? (done) => progress(offset + done, totalSamples) : undefined);
    for (const stage of chain.stages) {
      const meter = stage.processor.conduction;
      if (!meter) continue;
      const sums = conductingCounts.get(stage.id) ?? { conducting: 0, counted: 0 };
      sums.conducting += meter.conductingSamples;
      sums.counted += meter.countedSamples;
      conductingCounts.set(stage.id, sums);
    }
    return rendered;
  });

  const input = levelFigures(calibrated.channels, voltsAtFullScale);
  const output = levelFigures(volts, voltsAtFullScale);
  const overs = findOvers(volts, voltsAtFullScale, wav.sampleRate);
  const conducting: Record<string, number> = {};
  for (const [id, sums] of conductingCounts) conducting[id] = sums.counted > 0 ? sums.conducting / sums.counted : 0;

  const warnings: string[] = [];
  if (overs.count > 0) {
    warnings.push(
      `${overs.count} samples exceed digital full scale (max ${overs.maxDbfs.toFixed(1)} dBFS, first at ${overs.firstSeconds?.toFixed(3)} s); use --bits 32f to keep them or a larger --full-scale`,
    );
  }
  if (output.rmsDbfs - input.rmsDbfs > HOT_RENDER_DB) {
    warnings.push(
      `render is ${(output.rmsDbfs - input.rmsDbfs).toFixed(1)} dB louder (RMS) than its input: start playback at a low volume`,
    );
  }

  return {
    volts,
    summary: {
      take: wav.path,
      design: design.name,
      sampleRate: wav.sampleRate,
      channels: calibrated.channels.length,
      seconds: wav.frames / wav.sampleRate,
      oversample: options.oversample,
      voltsAtFullScale,
      input,
      output,
      conducting,
      overs,
      warnings,
    },
  };
}
