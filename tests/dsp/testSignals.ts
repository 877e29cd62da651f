/** Deterministic test signals shared by the dsp, analysis and report tests (fixed seeds). */

import { mulberry32 } from '../../src/dsp/random.js';

/** Uniform PRNG in [0, 1) (mulberry32, src/dsp/random.ts), fixed seed. */
export const createUniformRandom = mulberry32;

/** Uniform noise in [-1, 1). */
export function uniformNoise(length: number, seed: number): Float64Array {
  const random = createUniformRandom(seed);
  return new Float64Array(length).map(() => random() * 2 - 1);
}

/** Gaussian white noise of standard deviation `sigma` (Box-Muller). */
export function gaussianNoise(length: number, sigma: number, seed: number): Float64Array {
  const random = createUniformRandom(seed);
  const out = new Float64Array(length);
  for (let i = 0; i < length; i++) {
    const u1 = 1 - random();
    const u2 = random();
    out[i] = sigma * Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  }
  return out;
}

/** Sum of sines: components of peak amplitude `amplitude` at `hz`, phase in radians. */
export function sumOfSines(
  length: number,
  sampleRate: number,
  components: readonly { hz: number; amplitude: number; phase?: number }[],
): Float64Array {
  const out = new Float64Array(length);
  for (const { hz, amplitude, phase = 0 } of components) {
    const w = (2 * Math.PI * hz) / sampleRate;
    for (let n = 0; n < length; n++) out[n] += amplitude * Math.sin(w * n + phase);
  }
  return out;
}
