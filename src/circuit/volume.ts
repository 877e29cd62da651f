/**
 * Volume stage: a pot wired as a voltage divider, output at the wiper, unloaded. The gain is the
 * taper's resistance fraction at the knob position (reversed pots see 1 - position).
 */
import { analog, bilinearTransform, type AnalogTransferFunction, type DigitalTransferFunction } from '../dsp/bilinear.js';
import { UserError } from '../errors.js';
import { potFraction } from '../design/taper.js';
import type { CircuitContext, VolumeStage } from '../design/types.js';
import type { Processor } from '../dsp/processor.js';

/** H(s) = k, the divider ratio at `position` (0..1, 0 fully counter-clockwise). */
export function volumeStageSmallSignal(spec: VolumeStage, position: number): AnalogTransferFunction {
  if (!(position >= 0 && position <= 1)) {
    throw new UserError(`stage "${spec.id}": knob "${spec.knob}" position must be between 0 and 1, got ${position}`);
  }
  return analog([potFraction(spec.taper, position, spec.reverse)], [1]);
}

export function designVolumeStage(spec: VolumeStage, position: number, ctx: CircuitContext): DigitalTransferFunction {
  return bilinearTransform(volumeStageSmallSignal(spec, position), ctx.sampleRate);
}

/** A constant gain: the design's b[0]. */
export function createVolumeStage(design: DigitalTransferFunction): Processor {
  const gain = design.b[0];
  return {
    latencySamples: 0,
    reset(): void {},
    process(block: Float64Array): void {
      for (let i = 0; i < block.length; i++) block[i] *= gain;
    },
  };
}
