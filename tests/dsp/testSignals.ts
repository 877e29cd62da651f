/** Deterministic test signals shared by the dsp, analysis and report tests (fixed seeds). */

/** Uniform PRNG in [0, 1) (mulberry32), fixed seed. */
export function createUniformRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

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
