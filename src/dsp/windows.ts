/**
 * Spectral analysis windows and their figures of merit (F. J. Harris, "On the use of windows for
 * harmonic analysis with the discrete Fourier transform", Proc. IEEE 66(1), 1978).
 * Windows are DFT-even ("periodic"): w[n] for n = 0..N-1 of a length-N+1 symmetric window with the
 * last sample dropped, which is the form Harris tabulates for spectral analysis.
 */

/** 4-term Blackman-Harris coefficients a0..a3 (Harris 1978, minimum 4-term, -92 dB side lobe). */
export const BLACKMAN_HARRIS_4 = [0.35875, 0.48829, 0.14128, 0.01168] as const;

/** Sum-of-cosines window w[n] = sum_k (-1)^k a_k cos(2 pi k n / N). */
function cosineSumWindow(length: number, coefficients: readonly number[]): Float64Array {
  if (!Number.isInteger(length) || length < 1) throw new RangeError(`window length must be a positive integer, got ${length}`);
  const w = new Float64Array(length);
  for (let n = 0; n < length; n++) {
    const phase = (2 * Math.PI * n) / length;
    let value = 0;
    for (let k = 0; k < coefficients.length; k++) value += (k % 2 === 0 ? 1 : -1) * coefficients[k] * Math.cos(k * phase);
    w[n] = value;
  }
  return w;
}

export function blackmanHarrisWindow(length: number): Float64Array {
  return cosineSumWindow(length, BLACKMAN_HARRIS_4);
}

/** Hann window, a0 = a1 = 0.5. */
export function hannWindow(length: number): Float64Array {
  return cosineSumWindow(length, [0.5, 0.5]);
}

/** Coherent gain: sum(w) / N (Harris 1978, Table 1: 0.50 for Hann, 0.36 for 4-term Blackman-Harris). */
export function coherentGain(window: Float64Array): number {
  let sum = 0;
  for (let n = 0; n < window.length; n++) sum += window[n];
  return sum / window.length;
}

/** Sum of w[n]^2 (the window's energy), used for power normalisation. */
export function windowEnergy(window: Float64Array): number {
  let sum = 0;
  for (let n = 0; n < window.length; n++) sum += window[n] * window[n];
  return sum;
}

/** Equivalent noise bandwidth in bins: N sum(w^2) / (sum w)^2 (Harris 1978). */
export function equivalentNoiseBandwidthBins(window: Float64Array): number {
  const sum = coherentGain(window) * window.length;
  return (window.length * windowEnergy(window)) / (sum * sum);
}
