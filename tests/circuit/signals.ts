/** Test signals and a direct DFT at chosen frequencies (coherent sampling, so no window is needed). */

export function sine(amplitude: number, hz: number, sampleRate: number, length: number): Float64Array {
  const out = new Float64Array(length);
  for (let i = 0; i < length; i++) out[i] = amplitude * Math.sin((2 * Math.PI * hz * i) / sampleRate);
  return out;
}

/**
 * Amplitude of the component at `hz` over `x` (length a whole number of periods of `hz`):
 * |sum x[n] e^{-j 2 pi f n / fs}| * 2 / N.
 */
export function toneAmplitude(x: Float64Array, hz: number, sampleRate: number): number {
  let re = 0;
  let im = 0;
  const w = (2 * Math.PI * hz) / sampleRate;
  for (let i = 0; i < x.length; i++) {
    re += x[i] * Math.cos(w * i);
    im -= x[i] * Math.sin(w * i);
  }
  return (2 * Math.hypot(re, im)) / x.length;
}

/** Harmonic levels in dB relative to the fundamental, for harmonics 2..count. */
export function harmonicsDbc(x: Float64Array, fundamentalHz: number, sampleRate: number, count: number): number[] {
  const fundamental = toneAmplitude(x, fundamentalHz, sampleRate);
  const out: number[] = [];
  for (let h = 2; h <= count; h++) out.push(20 * Math.log10(toneAmplitude(x, h * fundamentalHz, sampleRate) / fundamental));
  return out;
}
