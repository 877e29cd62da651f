/**
 * True-peak estimate after ITU-R BS.1770-4 Annex 2: interpolate the signal 4x with a low-pass
 * (polyphase) FIR and take the largest absolute value of the interpolated samples.
 *
 * The interpolator is a Kaiser-windowed sinc (16 taps per phase, beta 8): enough for signals up to
 * about 0.45 of the sample rate, as the Annex asks of its example filter. It is local to this file
 * because true-peak reading works on whole arrays, not the streaming blocks of the render path.
 */

const OVERSAMPLING = 4;
const TAPS_PER_PHASE = 16;
const KAISER_BETA = 8;

/** Zeroth-order modified Bessel function of the first kind, power series (Abramowitz & Stegun 9.6.12). */
function besselI0(x: number): number {
  let sum = 1;
  let term = 1;
  const quarterSquare = (x * x) / 4;
  for (let k = 1; k < 50 && term > 1e-17 * sum; k++) {
    term *= quarterSquare / (k * k);
    sum += term;
  }
  return sum;
}

/**
 * Polyphase coefficients: phase p (0..3) interpolates at t = n + p / 4 from x[n - 7 .. n + 8],
 * h_p[i] = sinc(t - j) * kaiser((t - j) / half-width) with j = n - 7 + i.
 */
function designInterpolatorPhases(): Float64Array[] {
  const half = TAPS_PER_PHASE / 2;
  const norm = besselI0(KAISER_BETA);
  const phases: Float64Array[] = [];
  for (let p = 0; p < OVERSAMPLING; p++) {
    const taps = new Float64Array(TAPS_PER_PHASE);
    for (let i = 0; i < TAPS_PER_PHASE; i++) {
      const distance = p / OVERSAMPLING + (half - 1) - i; // t - j, in input samples
      const sinc = distance === 0 ? 1 : Math.sin(Math.PI * distance) / (Math.PI * distance);
      const r = distance / half;
      const kaiser = Math.abs(r) >= 1 ? 0 : besselI0(KAISER_BETA * Math.sqrt(1 - r * r)) / norm;
      taps[i] = sinc * kaiser;
    }
    phases.push(taps);
  }
  return phases;
}

const PHASES = designInterpolatorPhases();

/** Largest absolute value of the 4x-interpolated channel (samples outside the array count as 0). */
export function truePeakLinear(channel: ArrayLike<number>): number {
  const length = channel.length;
  const first = TAPS_PER_PHASE / 2 - 1;
  let peak = 0;
  for (let n = 0; n < length; n++) {
    const start = n - first;
    const inside = start >= 0 && start + TAPS_PER_PHASE <= length;
    for (let p = 0; p < OVERSAMPLING; p++) {
      const taps = PHASES[p];
      let y = 0;
      if (inside) {
        for (let i = 0; i < TAPS_PER_PHASE; i++) y += taps[i] * channel[start + i];
      } else {
        for (let i = 0; i < TAPS_PER_PHASE; i++) {
          const j = start + i;
          if (j >= 0 && j < length) y += taps[i] * channel[j];
        }
      }
      const magnitude = Math.abs(y);
      if (magnitude > peak) peak = magnitude;
    }
  }
  return peak;
}

/** True peak in dBTP (dB re full scale 1.0) over all channels; -Infinity for digital silence. */
export function truePeakDb(channels: readonly ArrayLike<number>[]): number {
  let peak = 0;
  for (const channel of channels) peak = Math.max(peak, truePeakLinear(channel));
  return 20 * Math.log10(peak);
}
