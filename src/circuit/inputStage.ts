/**
 * Input block: series resistor Rs, coupling capacitor C, pull-down resistor Rp to the bias point;
 * output taken at the pull-down node, unloaded (the next stage is a buffer). Voltage divider of
 * Rp against Rs + 1/(sC):
 *   H(s) = s Rp C / (1 + s (Rs + Rp) C)
 * a first-order high-pass with corner fc = 1 / (2 pi (Rs + Rp) C) and high-frequency gain
 * Rp / (Rs + Rp).
 */
import { requirePositive } from '../errors.js';
import { analog, type AnalogTransferFunction, type DigitalTransferFunction } from '../dsp/bilinear.js';
import { discretiseFirstOrder, rcCornerHz } from '../dsp/firstOrderSection.js';
import { createIirFilter } from '../dsp/iir.js';
import type { CircuitContext, InputStage } from '../design/types.js';
import type { Processor } from '../dsp/processor.js';

export function inputStageSmallSignal(spec: InputStage<number>, _ctx?: CircuitContext): AnalogTransferFunction {
  requirePositive(spec.series, `stage "${spec.id}" series`, 'ohms', true);
  requirePositive(spec.coupling, `stage "${spec.id}" coupling`, 'farads');
  requirePositive(spec.pulldown, `stage "${spec.id}" pulldown`, 'ohms');
  return analog([0, spec.pulldown * spec.coupling], [1, (spec.series + spec.pulldown) * spec.coupling]);
}

export function designInputStage(spec: InputStage<number>, ctx: CircuitContext): DigitalTransferFunction {
  const cornerHz = rcCornerHz(spec.series + spec.pulldown, spec.coupling);
  return discretiseFirstOrder(inputStageSmallSignal(spec), cornerHz, ctx.sampleRate, `stage "${spec.id}"`);
}

export function createInputStage(design: DigitalTransferFunction): Processor {
  return createIirFilter(design);
}
