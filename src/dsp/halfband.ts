/**
 * Half-band low-pass FIR design by the Kaiser window method. A half-band filter has its cutoff at a
 * quarter of its sample rate, h[0] = 1/2 and h[k] = 0 for every other even k, so only the centre
 * tap and the odd taps are ever multiplied (Vaidyanathan, Multirate Systems and Filter Banks,
 * sec. 4.6.1). Its response obeys H(f) + H(fs/2 - f) = 1, so its passband and stopband ripples are
 * equal and the band edges sit symmetrically about fs/4.
 */
import { kaiserBeta, kaiserOrder, kaiserWindowAt } from './kaiser.js';

export interface HalfbandDesign {
  /**
   * The 2K odd taps, in the order they multiply the polyphase branch: armTaps[t] = h[2t - (2K - 1)],
   * t = 0..2K-1 (symmetric: armTaps[t] = armTaps[2K - 1 - t]).
   */
  readonly armTaps: Float64Array;
  /** Group delay in samples at the filter's rate: M = 2K - 1 (the centre tap's index, odd). */
  readonly delaySamples: number;
}

/**
 * Half-band filter with a transition band `transitionWidth` wide (fraction of the filter's sample
 * rate, centred on a quarter of it) and at least `attenuationDb` of stopband attenuation, by the
 * Kaiser window method. The odd taps are scaled to sum to exactly 1/2, which makes the DC gain exactly 1 and the response
 * exactly zero at half the sample rate.
 */
export function designHalfband(transitionWidth: number, attenuationDb: number): HalfbandDesign {
  if (!(transitionWidth > 0 && transitionWidth < 0.5)) {
    throw new RangeError(`half-band transition width must be between 0 and 0.5 of the sample rate, got ${transitionWidth}`);
  }
  // Kaiser's formulas are estimates, least accurate for short filters. Start from the length they
  // predict and take the shortest filter that measurably meets the target, trying beta for the target
  // and a few steps above it (a larger beta trades transition width for lower side lobes, which is
  // what short filters with wide transition bands need).
  const limit = 10 ** (-attenuationDb / 20);
  const stopbandEdge = 0.25 + transitionWidth / 2;
  let halfArm = Math.max(1, Math.ceil(kaiserOrder(attenuationDb, transitionWidth) / 4));
  for (let attempt = 0; attempt < MAX_LENGTHENINGS; attempt++, halfArm++) {
    for (let step = 0; step <= BETA_STEPS; step++) {
      const design = windowedHalfband(halfArm, kaiserBeta(attenuationDb + step * BETA_STEP_DB));
      if (stopbandPeakBelow(design, stopbandEdge, limit)) return design;
    }
  }
  throw new RangeError(`half-band design did not reach ${attenuationDb} dB with transition width ${transitionWidth}`);
}

const BETA_STEP_DB = 2;
const BETA_STEPS = 10;
const MAX_LENGTHENINGS = 64;
const STOPBAND_GRID_POINTS = 4096;

function windowedHalfband(halfArm: number, beta: number): HalfbandDesign {
  const delaySamples = 2 * halfArm - 1;
  const armTaps = new Float64Array(2 * halfArm);
  let sum = 0;
  for (let t = 0; t < armTaps.length; t++) {
    const k = 2 * t - delaySamples;
    // Ideal half-band: h[k] = sin(pi k / 2) / (pi k), windowed.
    armTaps[t] = (Math.sin((Math.PI * k) / 2) / (Math.PI * k)) * kaiserWindowAt(k, delaySamples + 1, beta);
    sum += armTaps[t];
  }
  for (let t = 0; t < armTaps.length; t++) armTaps[t] *= 0.5 / sum;
  return { armTaps, delaySamples };
}

/**
 * Zero-phase amplitude A(f) = 1/2 + 2 sum_{k odd > 0} h[k] cos(2 pi f k), f as a fraction of the
 * filter's sample rate; the response is A(f) e^{-j 2 pi f M}.
 */
export function halfbandAmplitude(design: HalfbandDesign, frequency: number): number {
  const { armTaps, delaySamples } = design;
  let sum = 0.5;
  for (let t = armTaps.length / 2; t < armTaps.length; t++) {
    sum += 2 * armTaps[t] * Math.cos(2 * Math.PI * frequency * (2 * t - delaySamples));
  }
  return sum;
}

/** True when |A(f)| <= limit from `stopbandEdge` to half the sample rate, checked on a dense grid. */
function stopbandPeakBelow(design: HalfbandDesign, stopbandEdge: number, limit: number): boolean {
  for (let i = 0; i <= STOPBAND_GRID_POINTS; i++) {
    const f = stopbandEdge + ((0.5 - stopbandEdge) * i) / STOPBAND_GRID_POINTS;
    if (Math.abs(halfbandAmplitude(design, f)) > limit) return false;
  }
  return true;
}

/** The full impulse response h[0..2M] (centre at M), for analysis and tests. */
export function halfbandImpulseResponse(design: HalfbandDesign): Float64Array {
  const h = new Float64Array(2 * design.delaySamples + 1);
  h[design.delaySamples] = 0.5;
  design.armTaps.forEach((tap, t) => (h[2 * t] = tap));
  return h;
}
