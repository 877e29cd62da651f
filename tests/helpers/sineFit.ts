/**
 * Least-squares fit of y[n] ~ a cos(w n) + b sin(w n) over [start, end), w = 2 pi hz / sampleRate.
 * Returns the amplitude sqrt(a^2 + b^2) and the phase of the fitted cosine. Solves the 2x2 normal
 * equations, so the window need not hold a whole number of cycles.
 */
export function fitSine(
  y: Float64Array,
  hz: number,
  sampleRate: number,
  start = 0,
  end = y.length,
): { amplitude: number; phaseRadians: number } {
  const w = (2 * Math.PI * hz) / sampleRate;
  let cc = 0;
  let ss = 0;
  let cs = 0;
  let yc = 0;
  let ys = 0;
  for (let n = start; n < end; n++) {
    const c = Math.cos(w * n);
    const s = Math.sin(w * n);
    cc += c * c;
    ss += s * s;
    cs += c * s;
    yc += y[n] * c;
    ys += y[n] * s;
  }
  const det = cc * ss - cs * cs;
  const a = (yc * ss - ys * cs) / det;
  const b = (ys * cc - yc * cs) / det;
  return { amplitude: Math.hypot(a, b), phaseRadians: Math.atan2(-b, a) };
}

/** A sine of `amplitude` at `hz`, `length` samples, phase 0 at n = 0. */
export function makeSine(length: number, hz: number, sampleRate: number, amplitude = 1): Float64Array {
  const out = new Float64Array(length);
  const w = (2 * Math.PI * hz) / sampleRate;
  for (let n = 0; n < length; n++) out[n] = amplitude * Math.sin(w * n);
  return out;
}

/** Steady-state gain in dB of a block processor at `hz`: run a sine, fit the last half. */
export function sineGainDb(process: (block: Float64Array) => void, hz: number, sampleRate: number, length = 48000): number {
  const block = makeSine(length, hz, sampleRate);
  process(block);
  return 20 * Math.log10(fitSine(block, hz, sampleRate, length / 2, length).amplitude);
}
