/**
 * Plain first-order RC sections (`lowpass` / `highpass` stages), output unloaded (stages are
 * buffered from each other).
 *   low-pass   H(s) = 1 / (1 + s R C)
 *   high-pass  H(s) = s R C / (1 + s R C)
 * Both have their -3 dB corner at fc = 1 / (2 pi R C) (any circuits text, e.g. Horowitz & Hill,
 * The Art of Electronics, 3rd ed., sec. 1.7).
 */
import { requirePositive } from '../errors.js';
import { analog, type AnalogTransferFunction, type DigitalTransferFunction } from '../dsp/bilinear.js';
import { discretiseFirstOrder, rcCornerHz } from '../dsp/firstOrderSection.js';
import { createIirFilter } from '../dsp/iir.js';
import type { CircuitContext, RcStage } from '../design/types.js';
import type { Processor } from '../dsp/processor.js';

export function rcFilterSmallSignal(spec: RcStage<number>, _ctx?: CircuitContext): AnalogTransferFunction {
  validateRcFilter(spec);
  const tau = spec.r * spec.c;
  return spec.type === 'lowpass' ? analog([1], [1, tau]) : analog([0, tau], [1, tau]);
}

export function designRcFilter(spec: RcStage<number>, ctx: CircuitContext): DigitalTransferFunction {
  return discretiseFirstOrder(rcFilterSmallSignal(spec), rcCornerHz(spec.r, spec.c), ctx.sampleRate, `stage "${spec.id}"`);
}

export function createRcFilter(design: DigitalTransferFunction): Processor {
  return createIirFilter(design);
}

function validateRcFilter(spec: RcStage<number>): void {
  requirePositive(spec.r, `stage "${spec.id}" r`, 'ohms', true); // 0 ohm: no filtering (high-pass: no output)
  requirePositive(spec.c, `stage "${spec.id}" c`, 'farads');
}
