/**
 * Gaussian noise with a given power spectral density, seeded (so a render with noise repeats bit for
 * bit): frames of N samples synthesised by the inverse FFT of random spectra whose bins have the
 * density's power, sine-windowed and overlap-added at half a frame. Bin k (k != 0) of a frame gets a
 * complex normal deviate of variance N fs S(f_k) / 2, so the frame's variance is sum_k S(f_k) fs / N,
 * the density's integral (Parseval); the sine windows are power-complementary at 50 % overlap
 * (sin^2 + cos^2 = 1), so the overlap-added signal keeps that variance everywhere.
 */
import { createRealFft } from './fft.js';
import { normalDeviates } from './random.js';

const FRAME = 4096;

/**
 * Add noise of one-sided density `density(hz)` (units^2 per hertz, in the target's units) to
 * `target` (a channel at `sampleRate`), from `seed`.
 */
export function addShapedNoise(target: Float32Array, sampleRate: number, density: (hz: number) => number, seed: number): void {
  const fft = createRealFft(FRAME);
  const hop = FRAME / 2;
  const amplitude = new Float64Array(fft.binCount);
  for (let k = 1; k < fft.binCount - 1; k++) amplitude[k] = Math.sqrt((FRAME * sampleRate * density((k * sampleRate) / FRAME)) / 2);
  const window = Float64Array.from({ length: FRAME }, (_, n) => Math.sin((Math.PI * (n + 0.5)) / FRAME));
  const spectrum = new Float64Array(2 * fft.binCount);
  const frame = new Float64Array(FRAME);
  const normal = normalDeviates(seed);
  // A complex deviate with E|X|^2 = a^2: each part N(0, a^2 / 2).
  const part = Math.SQRT1_2;
  // Frames start half a frame before the signal, so every sample is covered by two of them.
  for (let start = -hop; start < target.length; start += hop) {
    for (let k = 0; k < fft.binCount; k++) {
      spectrum[2 * k] = amplitude[k] * part * normal();
      spectrum[2 * k + 1] = amplitude[k] * part * normal();
    }
    fft.realSignal(spectrum, frame);
    const from = Math.max(0, -start);
    const to = Math.min(FRAME, target.length - start);
    for (let n = from; n < to; n++) target[start + n] += window[n] * frame[n];
  }
}

/** A density given at points (ascending hz), interpolated log-log between them and held beyond the ends. */
export function interpolatedDensity(points: readonly { hz: number; density: number }[]): (hz: number) => number {
  return (hz) => {
    if (points.length === 0) return 0;
    if (hz <= points[0].hz) return points[0].density;
    const last = points[points.length - 1];
    if (hz >= last.hz) return last.density;
    let i = 1;
    while (points[i].hz < hz) i++;
    const a = points[i - 1];
    const b = points[i];
    if (!(a.density > 0 && b.density > 0)) return a.density + ((b.density - a.density) * (hz - a.hz)) / (b.hz - a.hz);
    const t = Math.log(hz / a.hz) / Math.log(b.hz / a.hz);
    return a.density * (b.density / a.density) ** t;
  };
}
