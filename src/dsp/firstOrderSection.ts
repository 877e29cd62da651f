import { UserError } from '../errors.js';
import { bilinearTransform, type AnalogTransferFunction, type DigitalTransferFunction } from './bilinear.js';

/** Corner frequency 1 / (2 pi R C) of a first-order RC section, in Hz. */
export function rcCornerHz(resistanceOhms: number, capacitanceFarads: number): number {
  return 1 / (2 * Math.PI * resistanceOhms * capacitanceFarads);
}

/** Above this fraction of Nyquist a corner is not pre-warped (tan() runs away near Nyquist). */
const PREWARP_LIMIT = 0.9;

/**
 * Discretise a first-order analog section by the bilinear transform pre-warped at its corner, so the
 * digital corner lands exactly on the analog one (bilinear transform with pre-warping; docs/models.md). A corner near or above Nyquist
 * (e.g. a tone pot at its end stop) is transformed without pre-warp: the section is then flat in
 * the audio band either way, and the plain bilinear transform is stable for any corner.
 */
export function discretiseFirstOrder(
  tf: AnalogTransferFunction,
  cornerHz: number,
  sampleRate: number,
  where: string,
): DigitalTransferFunction {
  if (!(cornerHz > 0)) {
    throw new UserError(`${where}: corner frequency ${cornerHz} Hz must be above 0; check the resistor and capacitor values`);
  }
  return bilinearTransform(tf, sampleRate, cornerHz < PREWARP_LIMIT * (sampleRate / 2) ? cornerHz : undefined);
}

