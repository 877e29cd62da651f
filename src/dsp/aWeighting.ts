/**
 * The A frequency weighting of IEC 61672-1:2013 (equation E.6 with the pole frequencies of
 * annex E): A(f) = 20 log10(f4^2 f^4 / ((f^2 + f1^2) sqrt(f^2 + f2^2) sqrt(f^2 + f3^2) (f^2 + f4^2))) + A1000,
 * with f1 = 20.60 Hz, f2 = 107.7 Hz, f3 = 737.9 Hz, f4 = 12194 Hz and A1000 = 2.000 dB, the
 * normalisation that makes A(1 kHz) = 0 dB (the constants to more digits, from memory; checked
 * against the standard's table in tests/dsp/aWeighting.test.ts).
 */
const F1_HZ = 20.598997;
const F2_HZ = 107.65265;
const F3_HZ = 737.86223;
const F4_HZ = 12194.217;
const A1000_DB = 1.9997;

/** |A(f)|^2, the A weighting as a power ratio at `hz`. */
export function aWeightingPower(hz: number): number {
  const f2 = hz * hz;
  const numerator = F4_HZ ** 2 * f2 * f2;
  const magnitude = numerator / ((f2 + F1_HZ ** 2) * Math.sqrt((f2 + F2_HZ ** 2) * (f2 + F3_HZ ** 2)) * (f2 + F4_HZ ** 2));
  return magnitude * magnitude * 10 ** (A1000_DB / 10);
}
