/**
 * The `measure` bench: drives a resolved design with test signals in volts and gathers THD,
 * harmonics, THD against level with onset points, predicted and measured small-signal responses,
 * the static transfer curve, aliasing, small-signal gain and maximum output swing.
 */
import type { Design } from '../design/types.js';
import { buildChain } from '../circuit/chain.js';
import { OVERSAMPLE_FACTORS, type OversampleFactor } from '../dsp/oversampler.js';
import { coherentBin, type HarmonicLine } from './coherentTone.js';
import { measureSteadyTone, REFERENCE_TONE, TONE_WINDOW } from './referenceTone.js';
import { findOnset, sweepThdByLevel, type LevelPoint } from './levelSweep.js';
import {
  compareResponses,
  measureResponse,
  predictResponse,
  responseFrequencies,
  responseProbeVolts,
  unwrapPhase,
  type ResponseDisagreement,
  type ResponsePoint,
} from './response.js';
import { staticTransferCurve, type TransferPoint } from './transferCurve.js';
import { measureAliasing, type AliasPoint } from './aliasing.js';
import { designNoise, PICKUP_SOURCE, PICKUP_SOURCE_LABEL, type NoiseReport } from './designNoise.js';
import type { SourceImpedance } from '../solver/noise.js';

export interface MeasureOptions {
  freqHz: number;
  levelVolts: number;
  oversample: OversampleFactor;
  aliasSweep: boolean;
  aliasFreqHz: number;
  aliasLevelVolts: number;
  sweepMinVolts: number;
  sweepMaxVolts: number;
  /** Sample rate the bench runs at (the file rate a render would have). */
  sampleRate: number;
  /** What terminates the input for the noise figures, and its name in reports. */
  noiseSource: { impedance: SourceImpedance | null; label: string };
}

export const DEFAULT_MEASURE_OPTIONS: MeasureOptions = {
  ...REFERENCE_TONE,
  oversample: 8,
  aliasSweep: false,
  aliasFreqHz: 4500,
  aliasLevelVolts: 1,
  sweepMinVolts: 0.005,
  sweepMaxVolts: 2,
  noiseSource: { impedance: PICKUP_SOURCE, label: PICKUP_SOURCE_LABEL },
};

/** Prediction and measurement must agree within this wherever the chain is linear (issue spec). */
export const RESPONSE_TOLERANCE_DB = 0.1;

const ALIAS_WINDOW = 32768;
const SWEEP_POINTS = 25;
const RESPONSE_POINTS = 31;
const TRANSFER_POINTS = 201;

export interface MeasureReport {
  design: string;
  sampleRate: number;
  oversample: OversampleFactor;
  freqHz: number;
  levelVolts: number;
  /** THD figures and levels in dB are null for a silent output. */
  thdPercent: number | null;
  thdnPercent: number | null;
  harmonics: HarmonicLine[];
  evenShare: number;
  oddShare: number;
  outputPeakVolts: number;
  thdByLevel: { volts: number; thdPercent: number | null }[];
  onset: { '1': number | null; '3': number | null; '10': number | null };
  response: ResponsePoint[];
  responseMeasured: ResponsePoint[];
  responseDisagreement: ResponseDisagreement[];
  transfer: TransferPoint[];
  aliasDbc: number | null;
  aliasHz: number;
  aliasByOversample: AliasPoint[];
  /** null when the output is silent at the reference tone. */
  gainDb: number | null;
  maxOutputVolts: number;
  /** Output noise with the input terminated by `noiseSource` (analysis/designNoise.ts). */
  noise: NoiseReport;
}

export function measureDesign(design: Design<number>, options: MeasureOptions): MeasureReport {
  const { sampleRate, oversample } = options;
  const chain = buildChain(design, { sampleRate, oversample });
  const steady = measureSteadyTone(chain, design, options);
  const tone = steady.analysis;
  const outputPeak = steady.outputPeakVolts;
  const settle = steady.settleSeconds;
  const toneOptions = { sampleRate, windowLength: TONE_WINDOW, fundamentalBin: steady.fundamentalBin, settleSeconds: settle };

  const sweep: LevelPoint[] = sweepThdByLevel(chain, {
    ...toneOptions,
    minVolts: options.sweepMinVolts,
    maxVolts: options.sweepMaxVolts,
    points: SWEEP_POINTS,
  });

  const frequencies = responseFrequencies(sampleRate, TONE_WINDOW, RESPONSE_POINTS);
  // Phase unwrapped along frequency; the measurement on its prediction's branch.
  const response = unwrapPhase(predictResponse(design, sampleRate, oversample, frequencies));
  const responseMeasured = unwrapPhase(
    measureResponse(chain, { sampleRate, windowLength: TONE_WINDOW, amplitudeVolts: responseProbeVolts(response), settleSeconds: settle }, frequencies),
    response,
  );
  const [gainPoint] = predictResponse(design, sampleRate, oversample, [tone.fundamentalHz]);

  const aliasOptions = {
    sampleRate,
    windowLength: ALIAS_WINDOW,
    fundamentalBin: coherentBin(options.aliasFreqHz, sampleRate, ALIAS_WINDOW),
    amplitudeVolts: options.aliasLevelVolts,
    settleSeconds: settle,
  };
  const aliasFactors = options.aliasSweep ? OVERSAMPLE_FACTORS : [oversample];
  const aliasByOversample = aliasFactors.map((factor) => measureAliasing(design, factor, aliasOptions));
  const chosenAlias = aliasByOversample.find((point) => point.oversample === oversample) ?? aliasByOversample[0];

  return {
    design: design.name,
    sampleRate,
    oversample,
    freqHz: tone.fundamentalHz,
    levelVolts: options.levelVolts,
    thdPercent: tone.thdPercent,
    thdnPercent: tone.thdnPercent,
    harmonics: tone.harmonics,
    evenShare: tone.evenShare,
    oddShare: tone.oddShare,
    outputPeakVolts: outputPeak,
    thdByLevel: sweep.map(({ volts, thdPercent }) => ({ volts, thdPercent })),
    onset: { '1': findOnset(sweep, 1), '3': findOnset(sweep, 3), '10': findOnset(sweep, 10) },
    response,
    responseMeasured,
    responseDisagreement: compareResponses(response, responseMeasured, RESPONSE_TOLERANCE_DB),
    transfer: staticTransferCurve(design, options.sweepMaxVolts, TRANSFER_POINTS),
    aliasDbc: chosenAlias.aliasDbc,
    aliasHz: chosenAlias.aliasHz,
    aliasByOversample,
    gainDb: gainPoint.db,
    maxOutputVolts: Math.max(outputPeak, ...sweep.map((point) => point.outputPeakVolts)),
    // The SNR's signal: the RMS of the output's fundamental at the reference tone.
    noise: designNoise(design, { source: options.noiseSource.impedance, sourceLabel: options.noiseSource.label, referenceVolts: tone.fundamentalVolts / Math.SQRT2 }),
  };
}
