/**
 * Planned real FFT: a typed wrapper over the npm package fft.js (radix-4, power-of-two sizes).
 * The plan (tables and work buffers) is made once in `createRealFft`; the transforms write into
 * buffers the caller owns and allocate nothing.
 *
 * Convention: X[k] = sum_n x[n] e^{-j 2 pi k n / N}, unnormalised (as fft.js computes it).
 */
import FFT from 'fft.js';

/** The part of fft.js used here, with the types its own declaration file leaves as `any`. */
interface FftJsPlan {
  realTransform(out: Float64Array, data: Float64Array): void;
  inverseTransform(out: Float64Array, data: Float64Array): void;
}

export interface RealFft {
  /** Transform length N (a power of two, >= 4). */
  readonly size: number;
  /** Number of one-sided bins, N/2 + 1 (DC to Nyquist). */
  readonly binCount: number;
  /**
   * One-sided spectrum of `input` (length N) into `output` (length >= 2 (N/2 + 1)), interleaved
   * re, im for bins 0..N/2.
   */
  complexSpectrum(input: Float64Array, output: Float64Array): void;
  /** |X[k]| for bins 0..N/2 into `output` (length >= N/2 + 1). */
  magnitudeSpectrum(input: Float64Array, output: Float64Array): void;
  /** |X[k]|^2 for bins 0..N/2 into `output` (length >= N/2 + 1). */
  powerSpectrum(input: Float64Array, output: Float64Array): void;
  /**
   * The real signal (length N) whose one-sided spectrum is `spectrum` (interleaved re, im for bins
   * 0..N/2; the imaginary parts of DC and Nyquist are ignored): x[n] = (1/N) sum_k X[k] e^{+j 2 pi k n / N}.
   */
  realSignal(spectrum: Float64Array, output: Float64Array): void;
}

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n > 0 && (n & (n - 1)) === 0;
}

/** Largest power of two <= n (n >= 1). */
export function floorPowerOfTwo(n: number): number {
  return 2 ** Math.floor(Math.log2(n));
}

export function createRealFft(size: number): RealFft {
  if (!isPowerOfTwo(size) || size < 4) throw new RangeError(`FFT size must be a power of two >= 4, got ${size}`);
  const plan = new FFT(size) as unknown as FftJsPlan;
  const work = new Float64Array(2 * size);
  const full = new Float64Array(2 * size);
  const binCount = size / 2 + 1;

  const checkSizes = (input: Float64Array, output: Float64Array, outputLength: number): void => {
    if (input.length !== size) throw new RangeError(`FFT input length ${input.length} must equal the FFT size ${size}`);
    if (output.length < outputLength) throw new RangeError(`FFT output length ${output.length} must be at least ${outputLength}`);
  };

  return {
    size,
    binCount,
    complexSpectrum(input, output) {
      checkSizes(input, output, 2 * binCount);
      plan.realTransform(work, input);
      // fft.js fills bins 0..N/2 of `work` (the other half is the conjugate mirror).
      for (let i = 0; i < 2 * binCount; i++) output[i] = work[i];
    },
    magnitudeSpectrum(input, output) {
      checkSizes(input, output, binCount);
      plan.realTransform(work, input);
      for (let k = 0; k < binCount; k++) output[k] = Math.hypot(work[2 * k], work[2 * k + 1]);
    },
    powerSpectrum(input, output) {
      checkSizes(input, output, binCount);
      plan.realTransform(work, input);
      for (let k = 0; k < binCount; k++) {
        const re = work[2 * k];
        const im = work[2 * k + 1];
        output[k] = re * re + im * im;
      }
    },
    realSignal(spectrum, output) {
      if (spectrum.length < 2 * binCount) throw new RangeError(`spectrum length ${spectrum.length} must be at least ${2 * binCount}`);
      if (output.length !== size) throw new RangeError(`output length ${output.length} must equal the FFT size ${size}`);
      // Hermitian completion: X[N - k] = conj(X[k]); DC and Nyquist real.
      full[0] = spectrum[0];
      full[1] = 0;
      full[size] = spectrum[size];
      full[size + 1] = 0;
      for (let k = 1; k < size / 2; k++) {
        full[2 * k] = spectrum[2 * k];
        full[2 * k + 1] = spectrum[2 * k + 1];
        full[2 * (size - k)] = spectrum[2 * k];
        full[2 * (size - k) + 1] = -spectrum[2 * k + 1];
      }
      plan.inverseTransform(work, full);
      for (let n = 0; n < size; n++) output[n] = work[2 * n];
    },
  };
}
