/**
 * A design's output noise with its input terminated by a source impedance: each stage's own noise
 * at its output (solver/noise.ts; a named stage as its netlist block, netlist/stageBlocks.ts), carried
 * through the stages after it by their small-signal responses (stages are buffered from each other,
 * as the renderer models them, so only the first stage sees the source), powers added. Integrated
 * over the audio band unweighted and A-weighted (IEC 61672-1), and set against the output at the
 * reference tone. See docs/models.md, "Noise".
 */
import { analyseCircuitStage } from '../circuit/circuitStage.js';
import { stageAnalogResponse } from '../circuit/stageModels.js';
import type { CircuitContext, Design } from '../design/types.js';
import { aWeightingPower } from '../dsp/aWeighting.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';
import { amplitudeDb } from '../dsp/decibels.js';
import { namedStageCircuit } from '../netlist/stageBlocks.js';
import { stageOutputNoise, type SourceImpedance } from '../solver/noise.js';
import { logSpaced } from './levelSweep.js';

/**
 * The default termination: a passive single-coil pickup as its DC resistance in series with its
 * inductance, 10k + 3 H (common practice; typical figures from memory: 5-15k and 2-5 H).
 */
export const PICKUP_SOURCE: SourceImpedance = { ohms: 10e3, henries: 3 };
export const PICKUP_SOURCE_LABEL = 'pickup (10k + 3 H)';

/** Integration grid: this many points per octave over the audio band. */
const POINTS_PER_OCTAVE = 12;
/** Every this many grid points are reported in `densityPerHz` (1/3 octave). */
const REPORT_EVERY = 4;

export interface NoiseOptions {
  /** The input termination, or null for an ideal short. */
  source: SourceImpedance | null;
  /** How the termination is named in reports, e.g. "pickup (10k + 3 H)". */
  sourceLabel: string;
  /** RMS output at the reference tone, volts: the SNR's signal. */
  referenceVolts: number;
}

export interface NoiseReport {
  source: string;
  unweightedVolts: number;
  unweightedDbv: number | null;
  aWeightedVolts: number;
  aWeightedDbv: number | null;
  /** Reference output over the A-weighted noise, dB; null when either is zero. */
  snrDb: number | null;
  referenceVolts: number;
  densityPerHz: { hz: number; voltsPerRootHz: number }[];
  /** Each source's share of the unweighted output noise power, largest first. */
  contributors: { part: string; share: number }[];
}

/** Integral of `density` (per hertz) over the log-spaced `hz` grid, by the trapezoidal rule in ln f. */
function integrateLogGrid(hz: readonly number[], density: (f: number) => number): number {
  let sum = 0;
  for (let f = 0; f + 1 < hz.length; f++) sum += 0.5 * (density(f) * hz[f] + density(f + 1) * hz[f + 1]) * Math.log(hz[f + 1] / hz[f]);
  return sum;
}

export function designNoise(design: Design<number>, options: NoiseOptions): NoiseReport {
  const octaves = Math.log2(AUDIO_BAND_HIGH_HZ / AUDIO_BAND_LOW_HZ);
  const hz = logSpaced(AUDIO_BAND_LOW_HZ, AUDIO_BAND_HIGH_HZ, Math.round(octaves * POINTS_PER_OCTAVE) + 1);
  // Small-signal only: the rate is irrelevant, but the context needs one.
  const ctx: CircuitContext = { sampleRate: 48000, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  const totalSquared = new Float64Array(hz.length);
  const bySource = new Map<string, Float64Array>();
  // From the last stage back: `after[f]` is |H|^2 of every stage after the current one.
  const after = new Float64Array(hz.length).fill(1);
  for (let k = design.stages.length - 1; k >= 0; k--) {
    const stage = design.stages[k];
    const circuit = stage.type === 'circuit' ? stage : namedStageCircuit(stage, design.knobs);
    const { system, operatingPoint } = analyseCircuitStage(circuit, ctx, design.knobs);
    const own = stageOutputNoise(system, operatingPoint, hz, design.temperatureC, k === 0 ? options.source : null);
    for (const [label, powers] of own.bySource) {
      const carried = powers.map((p, f) => p * after[f]);
      bySource.set(label, carried);
      carried.forEach((p, f) => (totalSquared[f] += p));
    }
    stageAnalogResponse(stage, ctx, design.knobs, hz).forEach(({ re, im }, f) => (after[f] *= re * re + im * im));
  }
  const unweightedVolts = Math.sqrt(integrateLogGrid(hz, (f) => totalSquared[f]));
  const aWeightedVolts = Math.sqrt(integrateLogGrid(hz, (f) => totalSquared[f] * aWeightingPower(hz[f])));
  const totalPower = integrateLogGrid(hz, (f) => totalSquared[f]);
  const contributors = [...bySource]
    .map(([part, powers]) => ({ part, share: totalPower > 0 ? integrateLogGrid(hz, (f) => powers[f]) / totalPower : 0 }))
    .sort((a, b) => b.share - a.share);
  return {
    source: options.sourceLabel,
    unweightedVolts,
    unweightedDbv: amplitudeDb(unweightedVolts),
    aWeightedVolts,
    aWeightedDbv: amplitudeDb(aWeightedVolts),
    snrDb: aWeightedVolts > 0 && options.referenceVolts > 0 ? amplitudeDb(options.referenceVolts / aWeightedVolts) : null,
    referenceVolts: options.referenceVolts,
    densityPerHz: hz.flatMap((f, i) => (i % REPORT_EVERY === 0 ? [{ hz: f, voltsPerRootHz: Math.sqrt(totalSquared[i]) }] : [])),
    contributors,
  };
}
