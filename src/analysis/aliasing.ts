/**
 * Aliasing of the nonlinear stages: drive the chain with a high, hot coherent tone; harmonics above
 * the oversampled Nyquist fold back onto frequencies that are not harmonics of the tone. The strongest
 * such component in 20 Hz-20 kHz, relative to the fundamental, is the figure of merit.
 */
import type { Design } from '../design/types.js';
import { buildChain } from '../circuit/chain.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { createToneAnalyzer } from './coherentTone.js';
import { runSteadyTone } from './toneRun.js';

export interface AliasPoint {
  oversample: OversampleFactor;
  /** null for a silent output. */
  aliasDbc: number | null;
  aliasHz: number;
}

export interface AliasOptions {
  sampleRate: number;
  windowLength: number;
  fundamentalBin: number;
  amplitudeVolts: number;
  settleSeconds: number;
}

export function measureAliasing(design: Design<number>, oversample: OversampleFactor, options: AliasOptions): AliasPoint {
  const chain = buildChain(design, { sampleRate: options.sampleRate, oversample });
  const run = runSteadyTone(chain, options);
  const analysis = createToneAnalyzer(options.windowLength, options.sampleRate).analyze(run.output, options.fundamentalBin);
  return { oversample, aliasDbc: analysis.strongestInharmonicDbc, aliasHz: analysis.strongestInharmonicHz };
}
