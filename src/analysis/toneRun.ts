/**
 * Drive a chain with a coherent sine and return the steady-state window of its input and output.
 * The sine fades in over a few milliseconds, the chain settles for a time set by the design's
 * slowest time constants, then exactly N samples are kept.
 */
import type { Design } from '../design/types.js';
import type { Chain } from '../circuit/chain.js';
import { renderChannel } from '../circuit/renderChannel.js';
import { stageTimeConstantSum } from '../circuit/stageModels.js';

const FADE_IN_SECONDS = 0.01;
const MIN_SETTLE_SECONDS = 0.05;
const MAX_SETTLE_SECONDS = 1.0;
/** Settling time in multiples of the summed time constants (e^-8 ~ -70 dB residue). */
const SETTLE_TIME_CONSTANTS = 8;

/** Settling time from the stages' summed small-signal time constants (an upper bound on the slowest one). */
export function settleSeconds(design: Design<number>, sampleRate: number): number {
  const ctx = { sampleRate, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  let sum = 0;
  for (const stage of design.stages) sum = Math.max(sum, stageTimeConstantSum(stage, ctx, design.knobs));
  return Math.min(MAX_SETTLE_SECONDS, Math.max(MIN_SETTLE_SECONDS, SETTLE_TIME_CONSTANTS * sum));
}

export interface ToneRun {
  input: Float64Array;
  output: Float64Array;
}

export interface ToneRunOptions {
  sampleRate: number;
  windowLength: number;
  fundamentalBin: number;
  amplitudeVolts: number;
  settleSeconds: number;
}

export function runSteadyTone(chain: Chain, options: ToneRunOptions): ToneRun {
  const { sampleRate, windowLength, fundamentalBin, amplitudeVolts } = options;
  const settle = Math.round(options.settleSeconds * sampleRate);
  const total = settle + windowLength;
  const fade = Math.round(FADE_IN_SECONDS * sampleRate);
  const signal = new Float64Array(total);
  const step = (2 * Math.PI * fundamentalBin) / windowLength;
  for (let n = 0; n < total; n++) {
    const envelope = n < fade ? 0.5 - 0.5 * Math.cos((Math.PI * n) / fade) : 1;
    // Phase is taken modulo the window so the kept window holds exactly whole periods.
    signal[n] = amplitudeVolts * envelope * Math.sin(step * (n % windowLength));
  }
  const output = renderChannel(chain, signal);
  return { input: signal.subarray(settle), output: output.subarray(settle) };
}
