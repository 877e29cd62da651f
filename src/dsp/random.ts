/**
 * Seeded pseudo-random numbers, so that anything random (rendered noise, blind-test orders on a
 * seeded page) repeats bit for bit: Mulberry32, a small public-domain 32-bit generator, and standard
 * normal deviates from it by the Box-Muller transform (G. E. P. Box, M. E. Muller, Ann. Math. Stat.
 * 29(2), 1958).
 */

/** Uniform deviates in [0, 1) from a 32-bit seed. */
export function mulberry32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates, two per pair of uniforms (Box-Muller), from a 32-bit seed. */
export function normalDeviates(seed: number): () => number {
  const uniform = mulberry32(seed);
  let spare = 0;
  let hasSpare = false;
  return () => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    // 1 - u lies in (0, 1]: its logarithm is finite.
    const radius = Math.sqrt(-2 * Math.log(1 - uniform()));
    const angle = 2 * Math.PI * uniform();
    spare = radius * Math.sin(angle);
    hasSpare = true;
    return radius * Math.cos(angle);
  };
}
