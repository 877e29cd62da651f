import { UserError } from '../errors.js';
import { bilinearTransform, type AnalogTransferFunction, type DigitalTransferFunction } from './bilinear.js';

/** Corner frequency 1 / (2 pi R C) of a first-order RC section, in Hz. */
export function rcCornerHz(resistanceOhms: number, capacitanceFarads: number): number {
  return 1 / (2 * Math.PI * resistanceOhms * capacitanceFarads);
}

/**
 * Discretise a first-order analog section by the bilinear transform pre-warped at its corner, so the
 * digital corner lands exactly on the analog one (BRIEF section 2). `where` names the stage for the
 * error when the corner cannot be represented at this sample rate.
 */
export function discretiseFirstOrder(
  tf: AnalogTransferFunction,
  cornerHz: number,
  sampleRate: number,
  where: string,
): DigitalTransferFunction {
  const nyquistHz = sampleRate / 2;
  if (!(cornerHz > 0 && cornerHz < nyquistHz)) {
    throw new UserError(
      `${where}: corner frequency ${cornerHz.toPrecision(4)} Hz must be above 0 and below half the sample rate (${nyquistHz} Hz); check the resistor and capacitor values`,
    );
  }
  return bilinearTransform(tf, sampleRate, cornerHz);
}

/** Throws a UserError unless `value` is a finite number above zero (at least zero with `allowZero`). */
export function requirePositive(value: number, where: string, unit: string, allowZero = false): void {
  const ok = Number.isFinite(value) && (allowZero ? value >= 0 : value > 0);
  if (!ok) {
    throw new UserError(`${where}: expected ${allowZero ? 'zero or more' : 'a value above zero'} in ${unit}, got ${value}`);
  }
}
