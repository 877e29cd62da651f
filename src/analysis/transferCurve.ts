/**
 * Static transfer curve vin -> vout of the chain. Each stage is taken at its mid-band steady state:
 * linear stages contribute their passband gain (the largest |H| in 20 Hz-20 kHz); the named
 * nonlinear stages are rebuilt without their capacitors (series capacitors shorted, shunt capacitors
 * open, which is what they are in mid-band at DC), and driven with a slow stepped ramp so the
 * op-amp's bandwidth and slew play no part. A circuit stage cannot tell its series capacitors from
 * its shunt ones, so it keeps them all and is traced by a settled 1 kHz tone instead (its curve then
 * includes whatever the circuit does in one millisecond).
 */
import type { CircuitContext, Design, Stage } from '../design/types.js';
import { createStageProcessor, isNonlinearStage, stageAnalogResponse, stageTimeConstantSum } from '../circuit/stageModels.js';
import { logSpaced } from './levelSweep.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

export interface TransferPoint {
  vin: number;
  vout: number;
}

const HOLD_SAMPLES = 64;
// A high rate keeps every corner (including the op-amp's closed-loop pole) far below Nyquist.
const RAMP_RATE = 768000;

function passbandGain(stage: Stage<number>, ctx: CircuitContext, knobs: Record<string, number>): number {
  return Math.max(...stageAnalogResponse(stage, ctx, knobs, logSpaced(AUDIO_BAND_LOW_HZ, AUDIO_BAND_HIGH_HZ, 61)).map(({ re, im }) => Math.hypot(re, im)));
}

/** A circuit stage keeps its capacitors: its curve is traced by the rising half of a settled tone. */
const TRACE_TONE_HZ = 1000;
const TRACE_MAX_SETTLE_SECONDS = 1;

/**
 * `signal` (a stepped ramp of `vin` levels, HOLD_SAMPLES each) through a circuit stage: the output
 * where a settled 1 kHz tone of the ramp's peak passes each level on its rising half.
 */
function traceCircuitStage(stage: Stage<number>, ctx: CircuitContext, knobs: Record<string, number>, signal: Float64Array, points: number): void {
  const levels = Array.from({ length: points }, (_, i) => signal[(i + 1) * HOLD_SAMPLES - 1]);
  const peak = Math.max(...levels.map(Math.abs));
  const period = Math.round(ctx.sampleRate / TRACE_TONE_HZ);
  const settlePeriods = Math.ceil(Math.min(TRACE_MAX_SETTLE_SECONDS, 8 * stageTimeConstantSum(stage, ctx, knobs)) * TRACE_TONE_HZ) + 2;
  const tone = new Float64Array((settlePeriods + 1) * period);
  for (let n = 0; n < tone.length; n++) tone[n] = peak * Math.sin((2 * Math.PI * n) / period);
  createStageProcessor(stage, ctx, knobs).process(tone);
  const lastPeriod = settlePeriods * period;
  levels.forEach((level, i) => {
    // The rising half runs from phase -pi/2 to pi/2: the sample at phase asin(level / peak).
    const phase = peak > 0 ? Math.asin(Math.max(-1, Math.min(1, level / peak))) : 0;
    const index = lastPeriod + ((Math.round((phase / (2 * Math.PI)) * period) + period) % period);
    signal.fill(tone[index], i * HOLD_SAMPLES, (i + 1) * HOLD_SAMPLES);
  });
}

function withoutCapacitors(stage: Stage<number>): Stage<number> {
  if (stage.type === 'gain') return { ...stage, cg: null, cf: null };
  if (stage.type === 'clipper') return { ...stage, cap: null };
  return stage;
}

/** The knee may sit anywhere from this fraction of the sweep's range up: log-spaced points reach down to it. */
const SMALLEST_LEVEL_FRACTION = 1e-4;
/** Share of the points spread evenly over the range; the rest are log-spaced each side of zero. */
const EVEN_SHARE = 0.4;

/**
 * Input levels from -maxVolts to maxVolts, ascending, about `points` of them: an even grid (the
 * curve's overall shape) merged with log-spaced levels each side of zero (the knee of a high-gain
 * design sits within a few millivolts of zero, where an even grid has one point or none).
 */
export function transferLevels(maxVolts: number, points: number): number[] {
  const even = Math.max(3, Math.round(points * EVEN_SHARE) | 1);
  const perSide = Math.max(2, Math.floor((points - even) / 2));
  const levels = new Set<number>(Array.from({ length: even }, (_, i) => -maxVolts + (2 * maxVolts * i) / (even - 1)));
  // The top log level is maxVolts itself, on the even grid already (and off by rounding here).
  for (const level of logSpaced(maxVolts * SMALLEST_LEVEL_FRACTION, maxVolts, perSide + 1).slice(0, -1)) {
    levels.add(level);
    levels.add(-level);
  }
  return [...levels].sort((a, b) => a - b);
}

/** About `points` (vin, vout) pairs from -maxVolts to maxVolts, dense near zero (`transferLevels`). */
export function staticTransferCurve(design: Design<number>, maxVolts: number, points: number): TransferPoint[] {
  const ctx: CircuitContext = { sampleRate: RAMP_RATE, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  const vin = transferLevels(maxVolts, points);
  const signal = new Float64Array(vin.length * HOLD_SAMPLES);
  vin.forEach((v, i) => signal.fill(v, i * HOLD_SAMPLES, (i + 1) * HOLD_SAMPLES));
  for (const stage of design.stages) {
    if (stage.type === 'circuit') {
      traceCircuitStage(stage, ctx, design.knobs, signal, vin.length);
    } else if (isNonlinearStage(stage)) {
      createStageProcessor(withoutCapacitors(stage), ctx, design.knobs).process(signal);
    } else {
      const gain = passbandGain(stage, ctx, design.knobs);
      for (let i = 0; i < signal.length; i++) signal[i] *= gain;
    }
  }
  return vin.map((v, i) => ({ vin: v, vout: signal[(i + 1) * HOLD_SAMPLES - 1] }));
}
