/**
 * Static transfer curve vin -> vout of the chain. Each stage is taken at its mid-band steady state:
 * linear stages contribute their passband gain (the largest |H| in 20 Hz-20 kHz); nonlinear stages
 * are rebuilt without their capacitors (series capacitors shorted, shunt capacitors open, which is
 * what they are in mid-band at DC), and driven with a slow stepped ramp so the op-amp's bandwidth
 * and slew play no part.
 */
import type { CircuitContext, Design, Stage } from '../design/types.js';
import { analogResponse } from '../dsp/bilinear.js';
import { createStageProcessor, isNonlinearStage, stageSmallSignal } from '../circuit/stageModels.js';
import { logSpaced } from './levelSweep.js';

export interface TransferPoint {
  vin: number;
  vout: number;
}

const HOLD_SAMPLES = 64;
// A high rate keeps every corner (including the op-amp's closed-loop pole) far below Nyquist.
const RAMP_RATE = 768000;

function passbandGain(stage: Stage<number>, ctx: CircuitContext, knobs: Record<string, number>): number {
  const tf = stageSmallSignal(stage, ctx, knobs);
  let best = 0;
  for (const hz of logSpaced(20, 20000, 61)) {
    const [re, im] = analogResponse(tf, hz);
    best = Math.max(best, Math.hypot(re, im));
  }
  return best;
}

function withoutCapacitors(stage: Stage<number>): Stage<number> {
  if (stage.type === 'gain') return { ...stage, cg: null, cf: null };
  if (stage.type === 'clipper') return { ...stage, cap: null };
  return stage;
}

export function staticTransferCurve(design: Design<number>, maxVolts: number, points: number): TransferPoint[] {
  const ctx: CircuitContext = { sampleRate: RAMP_RATE, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  const vin = Array.from({ length: points }, (_, i) => -maxVolts + (2 * maxVolts * i) / (points - 1));
  const signal = new Float64Array(points * HOLD_SAMPLES);
  vin.forEach((v, i) => signal.fill(v, i * HOLD_SAMPLES, (i + 1) * HOLD_SAMPLES));
  for (const stage of design.stages) {
    if (isNonlinearStage(stage)) {
      createStageProcessor(withoutCapacitors(stage), ctx, design.knobs).process(signal);
    } else {
      const gain = passbandGain(stage, ctx, design.knobs);
      for (let i = 0; i < signal.length; i++) signal[i] *= gain;
    }
  }
  return vin.map((v, i) => ({ vin: v, vout: signal[(i + 1) * HOLD_SAMPLES - 1] }));
}
