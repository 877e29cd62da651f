/**
 * Analog and digital rational transfer functions and the bilinear transform between them.
 * Analog coefficients can only become digital through `bilinearTransform`, so an analog set can
 * never reach a filter loop (the types are branded).
 *
 * Analog:  H(s) = (b0 + b1 s + ... ) / (a0 + a1 s + ...)      coefficients in ascending powers of s
 * Digital: H(z) = (b0 + b1 z^-1 + ...) / (1 + a1 z^-1 + ...)   coefficients in ascending powers of z^-1
 */

export interface AnalogTransferFunction {
  readonly domain: 'analog';
  readonly b: readonly number[];
  readonly a: readonly number[];
}

export interface DigitalTransferFunction {
  readonly domain: 'digital';
  readonly b: readonly number[];
  readonly a: readonly number[]; // a[0] === 1
  readonly sampleRate: number;
}

/** Drops highest-order zero coefficients (a vanished R C term must not add a pole), keeping one. */
function trimPolynomial(p: readonly number[]): number[] {
  let length = p.length;
  while (length > 1 && p[length - 1] === 0) length--;
  return p.slice(0, Math.max(1, length));
}

export function analog(b: readonly number[], a: readonly number[]): AnalogTransferFunction {
  return { domain: 'analog', b: trimPolynomial(b), a: trimPolynomial(a) };
}

/** Polynomial product, coefficients in ascending powers. */
export function multiplyPolynomials(p: readonly number[], q: readonly number[]): number[] {
  const out = new Array<number>(p.length + q.length - 1).fill(0);
  for (let i = 0; i < p.length; i++) for (let j = 0; j < q.length; j++) out[i + j] += p[i] * q[j];
  return out;
}

export function addPolynomials(p: readonly number[], q: readonly number[]): number[] {
  const out = new Array<number>(Math.max(p.length, q.length)).fill(0);
  p.forEach((c, i) => (out[i] += c));
  q.forEach((c, i) => (out[i] += c));
  return out;
}

export function scalePolynomial(p: readonly number[], k: number): number[] {
  return p.map((c) => c * k);
}

function powerOf(base: readonly number[], exponent: number): number[] {
  let out = [1];
  for (let i = 0; i < exponent; i++) out = multiplyPolynomials(out, base);
  return out;
}

/**
 * Bilinear transform s = K (1 - z^-1) / (1 + z^-1), K = 2 fs, or with pre-warping at `prewarpHz`
 * K = w0 / tan(w0 / (2 fs)) so that the analog and digital responses agree exactly at that frequency
 * (standard result, e.g. Oppenheim & Schafer, Discrete-Time Signal Processing, sec. 7.1.2).
 */
export function bilinearTransform(
  tf: AnalogTransferFunction,
  sampleRate: number,
  prewarpHz?: number,
): DigitalTransferFunction {
  const order = Math.max(tf.a.length, tf.b.length) - 1;
  let k = 2 * sampleRate;
  if (prewarpHz !== undefined && prewarpHz > 0) {
    if (prewarpHz >= sampleRate / 2) {
      throw new RangeError(`pre-warp frequency ${prewarpHz} Hz must be below half the sample rate (${sampleRate / 2} Hz)`);
    }
    const w0 = 2 * Math.PI * prewarpHz;
    k = w0 / Math.tan(w0 / (2 * sampleRate));
  }
  const minus = [1, -1];
  const plus = [1, 1];
  const expand = (coeffs: readonly number[]): number[] => {
    let acc: number[] = new Array<number>(order + 1).fill(0);
    coeffs.forEach((c, power) => {
      if (c === 0) return;
      const term = multiplyPolynomials(powerOf(minus, power), powerOf(plus, order - power));
      acc = addPolynomials(acc, scalePolynomial(term, c * k ** power));
    });
    return acc;
  };
  const b = expand(tf.b);
  const a = expand(tf.a);
  const a0 = a[0];
  if (a0 === 0 || !Number.isFinite(a0)) throw new RangeError('bilinear transform: degenerate denominator');
  return { domain: 'digital', b: b.map((c) => c / a0), a: a.map((c) => c / a0), sampleRate };
}

/** Complex value of a real-coefficient polynomial at x = re + j im (ascending powers). */
function evaluatePolynomial(p: readonly number[], re: number, im: number): [number, number] {
  let accRe = 0;
  let accIm = 0;
  for (let i = p.length - 1; i >= 0; i--) {
    const nextRe = accRe * re - accIm * im + p[i];
    const nextIm = accRe * im + accIm * re;
    accRe = nextRe;
    accIm = nextIm;
  }
  return [accRe, accIm];
}

function divideComplex(n: [number, number], d: [number, number]): [number, number] {
  const den = d[0] * d[0] + d[1] * d[1];
  return [(n[0] * d[0] + n[1] * d[1]) / den, (n[1] * d[0] - n[0] * d[1]) / den];
}

/** H(j 2 pi f) of an analog transfer function, as [re, im]. */
export function analogResponse(tf: AnalogTransferFunction, hz: number): [number, number] {
  const w = 2 * Math.PI * hz;
  return divideComplex(evaluatePolynomial(tf.b, 0, w), evaluatePolynomial(tf.a, 0, w));
}

/** H(e^{j w T}) of a digital transfer function, as [re, im]. */
export function digitalResponse(tf: DigitalTransferFunction, hz: number): [number, number] {
  const w = (2 * Math.PI * hz) / tf.sampleRate;
  // Polynomials are in z^-1 = e^{-j w T}.
  const zr = Math.cos(w);
  const zi = -Math.sin(w);
  return divideComplex(evaluatePolynomial(tf.b, zr, zi), evaluatePolynomial(tf.a, zr, zi));
}

export function magnitudeDb(h: [number, number]): number {
  return 10 * Math.log10(h[0] * h[0] + h[1] * h[1]);
}

export function phaseDegrees(h: [number, number]): number {
  return (Math.atan2(h[1], h[0]) * 180) / Math.PI;
}
