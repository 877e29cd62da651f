/**
 * Kaiser window and Kaiser's empirical design formulas for window-method FIR filters
 * (J. F. Kaiser, "Nonrecursive digital filter design using the I0-sinh window function",
 * Proc. IEEE ISCAS 1974; as given in Oppenheim & Schafer, Discrete-Time Signal Processing,
 * 2nd ed., pp. 475-476, the pages scipy.signal.kaiserord cites). The attenuation A = -20 log10(delta) in dB applies to both bands: the
 * window method gives the same peak ripple delta in the passband and the stopband.
 */

/**
 * Modified Bessel function of the first kind, order 0: I0(x) = sum_k ((x/2)^k / k!)^2
 * (Abramowitz & Stegun 9.6.12). The series converges for all x; summed until terms stop counting.
 */
export function besselI0(x: number): number {
  const quarterSquare = (x * x) / 4;
  let term = 1;
  let sum = 1;
  for (let k = 1; k < 500; k++) {
    term *= quarterSquare / (k * k);
    sum += term;
    if (term < sum * 1e-17) break;
  }
  return sum;
}

/** Kaiser's beta for a peak ripple of `attenuationDb` dB (O&S pp. 475-476). */
export function kaiserBeta(attenuationDb: number): number {
  const a = attenuationDb;
  if (a > 50) return 0.1102 * (a - 8.7);
  if (a >= 21) return 0.5842 * (a - 21) ** 0.4 + 0.07886 * (a - 21);
  return 0;
}

/**
 * Filter order N (length N + 1) that Kaiser's formula predicts for `attenuationDb` and a transition
 * band `transitionWidth` wide as a fraction of the sample rate: N = (A - 8) / (2.285 dw),
 * dw = 2 pi transitionWidth (O&S pp. 475-476).
 */
export function kaiserOrder(attenuationDb: number, transitionWidth: number): number {
  return Math.ceil((attenuationDb - 8) / (2.285 * 2 * Math.PI * transitionWidth));
}

/**
 * Kaiser window value at offset `k` from the centre of a symmetric window of half-length
 * `halfLength` (k = -halfLength..halfLength): I0(beta sqrt(1 - (k / halfLength)^2)) / I0(beta).
 */
export function kaiserWindowAt(k: number, halfLength: number, beta: number): number {
  const r = k / halfLength;
  return besselI0(beta * Math.sqrt(Math.max(0, 1 - r * r))) / besselI0(beta);
}
