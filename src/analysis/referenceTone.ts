/**
 * The steady test tone every bench figure starts from: a coherent sine (1 kHz, 0.5 V peak at
 * 48 kHz by default) through the chain, analysed on a 16384-sample window once settled. `measure`
 * reports it in full; `compare` uses its THD as one number per variant.
 */
import type { Design } from '../design/types.js';
import { buildChain, type Chain } from '../circuit/chain.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { coherentBin, createToneAnalyzer, type ToneAnalysis } from './coherentTone.js';
import { runSteadyTone, settleSeconds } from './toneRun.js';

export const TONE_WINDOW = 16384;

export const REFERENCE_TONE = { freqHz: 1000, levelVolts: 0.5, sampleRate: 48000 } as const;

export interface SteadyTone {
  analysis: ToneAnalysis;
  output: Float64Array;
  outputPeakVolts: number;
  fundamentalBin: number;
  settleSeconds: number;
}

export function measureSteadyTone(
  chain: Chain,
  design: Design<number>,
  tone: { freqHz: number; levelVolts: number; sampleRate: number },
): SteadyTone {
  const fundamentalBin = coherentBin(tone.freqHz, tone.sampleRate, TONE_WINDOW);
  const settle = settleSeconds(design, tone.sampleRate);
  const run = runSteadyTone(chain, {
    sampleRate: tone.sampleRate,
    windowLength: TONE_WINDOW,
    fundamentalBin,
    amplitudeVolts: tone.levelVolts,
    settleSeconds: settle,
  });
  let peak = 0;
  for (let i = 0; i < run.output.length; i++) peak = Math.max(peak, Math.abs(run.output[i]));
  return {
    analysis: createToneAnalyzer(TONE_WINDOW, tone.sampleRate).analyze(run.output, fundamentalBin),
    output: run.output,
    outputPeakVolts: peak,
    fundamentalBin,
    settleSeconds: settle,
  };
}

/** THD in percent of a design for the reference tone's frequency at `levelVolts` peak; null for a silent output. */
export function thdAtLevelPercent(design: Design<number>, oversample: OversampleFactor, levelVolts: number): number | null {
  const chain = buildChain(design, { sampleRate: REFERENCE_TONE.sampleRate, oversample });
  return measureSteadyTone(chain, design, { ...REFERENCE_TONE, levelVolts }).analysis.thdPercent;
}

/** THD in percent of a design at the reference tone; null for a silent output. */
export function referenceThdPercent(design: Design<number>, oversample: OversampleFactor): number | null {
  return thdAtLevelPercent(design, oversample, REFERENCE_TONE.levelVolts);
}
