/**
 * The only place where digital full scale meets volts (docs/models.md, "Signals and units"): a take is read either at a
 * fixed `fullScaleVolts` (volts peak at 0 dBFS) or scaled so its peak is `inputPeakVolts`; a render is
 * written back with the same volts-per-full-scale, so a unity design returns its input.
 */
import { requirePositive, UserError } from '../errors.js';

export type CalibrationScale = { fullScaleVolts: number } | { inputPeakVolts: number };

export interface Calibration {
  /** Volts that digital full scale (1.0) stands for, reading the take and writing its render. */
  voltsPerFullScale: number;
  /** Peak of the calibrated take, volts. */
  inputPeakVolts: number;
}

/** Largest |sample| over all channels. */
export function peakOf(channels: ReadonlyArray<Float32Array | Float64Array>): number {
  let peak = 0;
  for (const samples of channels) {
    for (let i = 0; i < samples.length; i++) {
      const magnitude = Math.abs(samples[i]);
      if (magnitude > peak) peak = magnitude;
    }
  }
  return peak;
}

/** Root mean square over all samples of all channels (0 for no samples). */
export function rmsOf(channels: ReadonlyArray<Float32Array | Float64Array>): number {
  let sumOfSquares = 0;
  let count = 0;
  for (const samples of channels) {
    for (let i = 0; i < samples.length; i++) sumOfSquares += samples[i] * samples[i];
    count += samples.length;
  }
  return count === 0 ? 0 : Math.sqrt(sumOfSquares / count);
}

/**
 * Float takes may exceed full scale a little (a hot interface, a normalised file); samples a million
 * times over it are a broken or mislabelled file, and would drive every stage into nonsense.
 */
export const MAX_TAKE_PEAK_FULL_SCALE = 1e6;

/**
 * The calibration of one take: volts = samples x voltsPerFullScale on the way in, and the same
 * factor back on the way out. `sourceName` (e.g. the file path) names the take in errors.
 * Input-peak mode refuses a silent take, which has no peak to scale.
 */
export function calibrate(channels: readonly Float32Array[], scale: CalibrationScale, sourceName?: string): Calibration {
  const digitalPeak = peakOf(channels);
  if (digitalPeak > MAX_TAKE_PEAK_FULL_SCALE) {
    const where = sourceName === undefined ? '' : `${sourceName}: `;
    throw new UserError(
      `${where}samples reach ${digitalPeak.toExponential(2)} x full scale (over ${MAX_TAKE_PEAK_FULL_SCALE} x, 120 dB above 0 dBFS): not a recording; check the file's sample format`,
    );
  }
  let voltsPerFullScale: number;
  if ('fullScaleVolts' in scale) {
    requirePositive(scale.fullScaleVolts, 'full-scale voltage', 'volts');
    voltsPerFullScale = scale.fullScaleVolts;
  } else {
    requirePositive(scale.inputPeakVolts, 'input peak', 'volts');
    if (digitalPeak === 0) {
      const where = sourceName === undefined ? '' : `${sourceName}: `;
      throw new UserError(`${where}take is silent (all samples 0), cannot scale it to an input peak of ${scale.inputPeakVolts} V`);
    }
    voltsPerFullScale = scale.inputPeakVolts / digitalPeak;
  }
  return { voltsPerFullScale, inputPeakVolts: digitalPeak * voltsPerFullScale };
}
