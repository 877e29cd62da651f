/**
 * Render one decoded take through a resolved design, in place: each channel is read as volts
 * (calibrated), run through a fresh chain block by block, and written back over the decoded samples
 * in digital full scale with the same calibration. A render therefore needs the decoded audio plus a
 * constant, however long the take. The level figures for the sidecar are gathered on the way.
 */
import type { DecodedWav } from '../audio/wavRead.js';
import { calibrate, type CalibrationScale } from '../audio/calibration.js';
import type { Design } from '../design/types.js';
import { buildChain } from '../circuit/chain.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { renderInto, type RenderProgress } from '../circuit/renderChannel.js';
import { findOvers, measureLevels, voltsToDbfs, type OverReport } from '../audio/levels.js';
import { addShapedNoise } from '../dsp/shapedNoise.js';

export interface RenderTakeOptions {
  oversample: OversampleFactor;
  scale: CalibrationScale;
  onProgress?: RenderProgress;
  /** Add the design's own output noise (one-sided density, V^2/Hz), seeded; channel c uses seed + c. */
  noise?: { density: (hz: number) => number; seed: number };
}

/** Levels of a take or render; the dB figures are null for silence. */
export interface LevelFigures {
  peakVolts: number;
  peakDbfs: number | null;
  rmsVolts: number;
  rmsDbfs: number | null;
  crestDb: number | null;
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

/** A render this much hotter (RMS) than its input earns a loudness warning. */
const HOT_RENDER_DB = 12;

function levelFigures(channels: readonly Float32Array[], voltsAtFullScale: number): LevelFigures {
  const levels = measureLevels(channels, voltsAtFullScale);
  return {
    peakVolts: levels.peakVolts,
    peakDbfs: voltsToDbfs(levels.peakVolts, voltsAtFullScale),
    rmsVolts: levels.rmsVolts,
    rmsDbfs: voltsToDbfs(levels.rmsVolts, voltsAtFullScale),
    crestDb: levels.crestDb,
  };
}

/** Renders `wav.channels` in place (they hold the render afterwards, full scale = 1) and sums it up. */
export function renderTakeInPlace(design: Design<number>, wav: DecodedWav, options: RenderTakeOptions): RenderSummary {
  const { voltsPerFullScale } = calibrate(wav.channels, options.scale, wav.path);
  const input = levelFigures(wav.channels, voltsPerFullScale);
  const chain = buildChain(design, { sampleRate: wav.sampleRate, oversample: options.oversample });
  const conductingCounts = new Map<string, { conducting: number; counted: number }>();
  const totalSamples = wav.channels.length * wav.frames;
  wav.channels.forEach((channel, index) => {
    const offset = index * wav.frames;
    const progress = options.onProgress;
    renderInto(chain, channel, channel, voltsPerFullScale, 1 / voltsPerFullScale, progress ? (done) => progress(offset + done, totalSamples) : undefined);
    const noise = options.noise;
    if (noise) addShapedNoise(channel, wav.sampleRate, (hz) => noise.density(hz) / (voltsPerFullScale * voltsPerFullScale), noise.seed + index);
    for (const stage of chain.stages) {
      const meter = stage.processor.conduction;
      if (!meter) continue;
      const sums = conductingCounts.get(stage.id) ?? { conducting: 0, counted: 0 };
      sums.conducting += meter.conductingSamples;
      sums.counted += meter.countedSamples;
      conductingCounts.set(stage.id, sums);
    }
  });

  const output = levelFigures(wav.channels, voltsPerFullScale);
  const overs = findOvers(wav.channels, wav.sampleRate);
  const conducting: Record<string, number> = {};
  for (const [id, sums] of conductingCounts) conducting[id] = sums.counted > 0 ? sums.conducting / sums.counted : 0;

  const warnings: string[] = [];
  if (overs.count > 0) {
    warnings.push(
      `${overs.count} samples exceed digital full scale (max ${overs.maxDbfs?.toFixed(1)} dBFS, first at ${overs.firstSeconds?.toFixed(3)} s); use --bits 32f to keep them or a larger --full-scale`,
    );
  }
  const louderDb = output.rmsDbfs !== null && input.rmsDbfs !== null ? output.rmsDbfs - input.rmsDbfs : null;
  if (louderDb !== null && louderDb > HOT_RENDER_DB) {
    warnings.push(`render is ${louderDb.toFixed(1)} dB louder (RMS) than its input: start playback at a low volume`);
  }

  return {
    take: wav.path,
    design: design.name,
    sampleRate: wav.sampleRate,
    channels: wav.channels.length,
    seconds: wav.frames / wav.sampleRate,
    oversample: options.oversample,
    voltsAtFullScale: voltsPerFullScale,
    input,
    output,
    conducting,
    overs,
    warnings,
  };
}
