/**
 * Tone stage: first-order passive low-pass, R = fixed + pot (already resolved from the knob) into C
 * to the bias point, output unloaded: H(s) = 1 / (1 + s R C), corner 1 / (2 pi R C).
 */
import { requirePositive } from '../errors.js';
import { analog, type AnalogTransferFunction, type DigitalTransferFunction } from '../dsp/bilinear.js';
import { discretiseFirstOrder, rcCornerHz } from '../dsp/firstOrderSection.js';
import { createIirFilter } from '../dsp/iir.js';
import type { CircuitContext, ToneStage } from '../design/types.js';
import type { Processor } from '../dsp/processor.js';

export function toneStageSmallSignal(spec: ToneStage<number>, _ctx?: CircuitContext): AnalogTransferFunction {
  requirePositive(spec.r, `stage "${spec.id}" resistance (fixed + pot)`, 'ohms', true); // 0 ohm: flat
  requirePositive(spec.cap, `stage "${spec.id}" cap`, 'farads');
  return analog([1], [1, spec.r * spec.cap]);
}

export function designToneStage(spec: ToneStage<number>, ctx: CircuitContext): DigitalTransferFunction {
  return discretiseFirstOrder(toneStageSmallSignal(spec), rcCornerHz(spec.r, spec.cap), ctx.sampleRate, `stage "${spec.id}"`);
}

export function createToneStage(design: DigitalTransferFunction): Processor {
  return createIirFilter(design);
}
