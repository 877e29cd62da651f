/**
 * Welch's averaged periodogram (P. D. Welch, "The use of fast Fourier transform for the estimation
 * of power spectra", IEEE Trans. Audio Electroacoustics 15(2), 1967): Hann-windowed segments with
 * 50 % overlap, one-sided, averaged. Used for the long-term average spectrum of a take.
 */
import { createRealFft } from './fft.js';
import { hannWindow, windowEnergy } from './windows.js';

export type WelchScaling =
  /** Power spectral density, units^2 / Hz: sums (times the bin width) to the mean square. */
  | 'density'
  /** Power per bin, units^2: a sine of peak amplitude A reads A^2 / 2 at its bin. */
  | 'spectrum';

export interface WelchOptions {
  /** Segment (and FFT) length in samples, a power of two. */
  segmentLength: number;
  scaling?: WelchScaling;
}

export interface WelchResult {
  /** Bin spacing in Hz (sampleRate / segmentLength); bin k is at k * binHz. */
  binHz: number;
  /** One-sided values for bins 0..segmentLength/2. */
  values: Float64Array;
  /** Number of segments averaged. */
  segmentCount: number;
}

export function welch(signal: Float64Array, sampleRate: number, options: WelchOptions): WelchResult {
  const { segmentLength, scaling = 'density' } = options;
  if (signal.length < segmentLength) {
    throw new RangeError(`Welch: signal of ${signal.length} samples is shorter than one segment (${segmentLength})`);
  }
  const fft = createRealFft(segmentLength);
  const window = hannWindow(segmentLength);
  const hop = segmentLength / 2;
  const segmentCount = Math.floor((signal.length - segmentLength) / hop) + 1;
  const segment = new Float64Array(segmentLength);
  const power = new Float64Array(fft.binCount);
  const values = new Float64Array(fft.binCount);

  for (let s = 0; s < segmentCount; s++) {
    const start = s * hop;
    for (let n = 0; n < segmentLength; n++) segment[n] = signal[start + n] * window[n];
    fft.powerSpectrum(segment, power);
    for (let k = 0; k < power.length; k++) values[k] += power[k];
  }

  let windowSum = 0;
  for (let n = 0; n < segmentLength; n++) windowSum += window[n];
  const scale = scaling === 'density' ? 1 / (sampleRate * windowEnergy(window)) : 1 / (windowSum * windowSum);
  const last = values.length - 1;
  for (let k = 0; k <= last; k++) {
    // One-sided: fold the negative frequencies onto the positive ones (DC and Nyquist appear once).
    const fold = k === 0 || k === last ? 1 : 2;
    values[k] *= (fold * scale) / segmentCount;
  }
  return { binHz: sampleRate / segmentLength, values, segmentCount };
}
