/**
 * THD of a design at the `measure` reference tone (1 kHz, 0.5 V peak, 48 kHz, 16384-sample
 * coherent window): one number per design for tables that compare variants.
 */
import type { Design } from '../design/types.js';
import { buildChain, type OversampleFactor } from '../circuit/chain.js';
import { coherentBin, createToneAnalyzer } from './coherentTone.js';
import { runSteadyTone, settleSeconds } from './toneRun.js';
import { DEFAULT_MEASURE_OPTIONS } from './measureDesign.js';

/** Same window as the measure bench's THD. */
const REFERENCE_WINDOW = 16384;

export function referenceThdPercent(design: Design<number>, oversample: OversampleFactor): number {
  const { freqHz, levelVolts, sampleRate } = DEFAULT_MEASURE_OPTIONS;
  const chain = buildChain(design, { sampleRate, oversample });
  const fundamentalBin = coherentBin(freqHz, sampleRate, REFERENCE_WINDOW);
  const run = runSteadyTone(chain, {
    sampleRate,
    windowLength: REFERENCE_WINDOW,
    fundamentalBin,
    amplitudeVolts: levelVolts,
    settleSeconds: settleSeconds(design, sampleRate),
  });
  return createToneAnalyzer(REFERENCE_WINDOW, sampleRate).analyze(run.output, fundamentalBin).thdPercent;
}
