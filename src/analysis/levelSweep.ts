/**
 * THD against input level: a log-spaced sweep of steady coherent tones, and the input levels where
 * THD first crosses given thresholds (the clipping onset a designer compares to a pickup's output).
 */
import type { Chain } from '../circuit/chain.js';
import { createToneAnalyzer } from './coherentTone.js';
import { runSteadyTone } from './toneRun.js';

export interface LevelPoint {
  volts: number;
  /** null where the output is silent. */
  thdPercent: number | null;
  outputPeakVolts: number;
}

export interface LevelSweepOptions {
  sampleRate: number;
  windowLength: number;
  fundamentalBin: number;
  settleSeconds: number;
  minVolts: number;
  maxVolts: number;
  points: number;
}

export function logSpaced(min: number, max: number, points: number): number[] {
  if (points < 2) return [min];
  const ratio = Math.log(max / min) / (points - 1);
  return Array.from({ length: points }, (_, i) => min * Math.exp(ratio * i));
}

export function sweepThdByLevel(chain: Chain, options: LevelSweepOptions): LevelPoint[] {
  const analyzer = createToneAnalyzer(options.windowLength, options.sampleRate);
  return logSpaced(options.minVolts, options.maxVolts, options.points).map((volts) => {
    const run = runSteadyTone(chain, { ...options, amplitudeVolts: volts });
    let peak = 0;
    for (let i = 0; i < run.output.length; i++) peak = Math.max(peak, Math.abs(run.output[i]));
    return {
      volts,
      thdPercent: analyzer.analyze(run.output, options.fundamentalBin).thdPercent,
      outputPeakVolts: peak,
    };
  });
}

/**
 * Input level (volts peak) where THD first rises through `thresholdPercent`, interpolated on
 * log-log axes between the two sweep points around the crossing; null when it never does.
 */
export function findOnset(points: readonly LevelPoint[], thresholdPercent: number): number | null {
  // Silent points have no THD: they cannot cross a threshold.
  const sounding = points.flatMap((p) => (p.thdPercent === null ? [] : [{ volts: p.volts, thd: p.thdPercent }]));
  if (sounding.length > 0 && sounding[0].thd >= thresholdPercent) return sounding[0].volts;
  for (let i = 1; i < sounding.length; i++) {
    const below = sounding[i - 1];
    const above = sounding[i];
    if (below.thd < thresholdPercent && above.thd >= thresholdPercent) {
      const t =
        (Math.log(thresholdPercent) - Math.log(Math.max(below.thd, 1e-12))) /
        (Math.log(above.thd) - Math.log(Math.max(below.thd, 1e-12)));
      return Math.exp(Math.log(below.volts) + t * (Math.log(above.volts) - Math.log(below.volts)));
    }
  }
  return null;
}
