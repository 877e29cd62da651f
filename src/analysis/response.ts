/**
 * Small-signal frequency response of a design: predicted from the stage models (a circuit stage's
 * analog circuit linearised at rest; a named stage's bilinear-discretised H at the rate it runs at;
 * the oversampler is flat and its latency is compensated) and measured through the full model with
 * stepped coherent sines at a low level.
 */
import type { Design } from '../design/types.js';
import type { Chain } from '../circuit/chain.js';
import { isNonlinearStage, stagePredictedResponse } from '../circuit/stageModels.js';
import { amplitudeDb, powerDb } from '../dsp/decibels.js';
import { coherentBin, createToneAnalyzer } from './coherentTone.js';
import { runSteadyTone } from './toneRun.js';
import { logSpaced } from './levelSweep.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

/** The response is probed with the output at or below this level, volts peak: small-signal for any gain. */
export const RESPONSE_PROBE_OUTPUT_VOLTS = 0.001;

/** Input amplitude for measuring a response: 1 mV, lowered by the largest predicted gain above 1 so the output stays at 1 mV. */
export function responseProbeVolts(predicted: readonly ResponsePoint[]): number {
  const peakGain = Math.max(1, ...predicted.map((point) => (point.db === null ? 0 : 10 ** (point.db / 20))));
  return RESPONSE_PROBE_OUTPUT_VOLTS / peakGain;
}

/** What `predictResponse` is, for reports: the two kinds of stage are predicted differently. */
export const PREDICTION_BASIS =
  'prediction: circuit stages are the analog circuit linearised at rest; named stages are their own discretised models, so for those the agreement checks the render, not the discretisation';

export interface ResponsePoint {
  hz: number;
  /** null where the output is silent (e.g. a volume knob at 0). */
  db: number | null;
  /** Phase in degrees: wrapped to (-180, 180] per point; `unwrapPhase` makes a curve continuous. */
  deg: number;
}

function wrapDegrees(deg: number): number {
  const wrapped = ((deg + 180) % 360 + 360) % 360 - 180;
  return wrapped === -180 ? 180 : wrapped;
}

/**
 * Phase unwrapped along frequency: each point moved by whole turns so it is within 180 degrees of the
 * one before (the usual unwrapping, e.g. numpy.unwrap), starting from the lowest frequency's wrapped
 * value; with `reference` (same frequencies), each point instead takes the turn closest to the
 * reference's, so a measurement follows its prediction's branch.
 */
export function unwrapPhase(points: readonly ResponsePoint[], reference?: readonly ResponsePoint[]): ResponsePoint[] {
  let previous: number | null = null;
  return points.map((point, i) => {
    const anchor = reference ? reference[i].deg : previous;
    const deg = anchor === null ? point.deg : anchor + wrapDegrees(point.deg - anchor);
    previous = deg;
    return { ...point, deg };
  });
}

/** Frequencies from 20 Hz to 20 kHz, `perOctave` per octave, rounded to the bins of the window. */
export function responseFrequencies(sampleRate: number, windowLength: number, points: number): number[] {
  const bins = logSpaced(AUDIO_BAND_LOW_HZ, AUDIO_BAND_HIGH_HZ, points).map((hz) => coherentBin(hz, sampleRate, windowLength));
  return [...new Set(bins)].map((bin) => (bin * sampleRate) / windowLength);
}

export function predictResponse(
  design: Design<number>,
  sampleRate: number,
  oversample: number,
  frequencies: readonly number[],
): ResponsePoint[] {
  const base = { sampleRate, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  const fast = { ...base, sampleRate: sampleRate * oversample };
  const stageResponses = design.stages.map((stage) => {
    const ctx = isNonlinearStage(stage) && oversample > 1 ? fast : base;
    return stagePredictedResponse(stage, ctx, design.knobs, frequencies);
  });
  return frequencies.map((hz, f) => {
    let re = 1;
    let im = 0;
    for (const response of stageResponses) {
      const { re: hr, im: hi } = response[f];
      [re, im] = [re * hr - im * hi, re * hi + im * hr];
    }
    return { hz, db: powerDb(re * re + im * im), deg: wrapDegrees((Math.atan2(im, re) * 180) / Math.PI) };
  });
}

export function measureResponse(
  chain: Chain,
  options: { sampleRate: number; windowLength: number; amplitudeVolts: number; settleSeconds: number },
  frequencies: readonly number[],
): ResponsePoint[] {
  const analyzer = createToneAnalyzer(options.windowLength, options.sampleRate);
  return frequencies.map((hz) => {
    const bin = coherentBin(hz, options.sampleRate, options.windowLength);
    const run = runSteadyTone(chain, { ...options, fundamentalBin: bin });
    const input = analyzer.analyze(run.input, bin);
    const output = analyzer.analyze(run.output, bin);
    return {
      hz,
      db: amplitudeDb(output.fundamentalVolts / input.fundamentalVolts),
      deg: wrapDegrees(((output.fundamentalPhase - input.fundamentalPhase) * 180) / Math.PI),
    };
  });
}

export interface ResponseDisagreement {
  hz: number;
  predictedDb: number | null;
  measuredDb: number | null;
}

/** Points where prediction and measurement differ by more than `toleranceDb`. */
export function compareResponses(
  predicted: readonly ResponsePoint[],
  measured: readonly ResponsePoint[],
  toleranceDb: number,
): ResponseDisagreement[] {
  return predicted
    .map((p, i) => ({ hz: p.hz, predictedDb: p.db, measuredDb: measured[i].db }))
    // Both silent agree; one silent and the other not is a disagreement.
    .filter((point) => (point.predictedDb === null || point.measuredDb === null ? point.predictedDb !== point.measuredDb : Math.abs(point.predictedDb - point.measuredDb) > toleranceDb));
}
