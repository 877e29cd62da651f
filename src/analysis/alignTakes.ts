/**
 * Aligning a recording of the built circuit to a reference (the model's render of the same dry take):
 * the latency by the peak of their cross-correlation, refined below a sample by the parabola through
 * the peak and its neighbours (e.g. Jacovitti & Scarano, IEEE Trans. Signal Process. 41(2), 1993),
 * and the recording moved by that latency with a linear phase in the frequency domain (an exact
 * fractional delay for a band-limited signal). Cross-correlation by FFT with zero padding.
 */
import { UserError } from '../errors.js';
import { createRealFft, type RealFft } from '../dsp/fft.js';

/** Below this normalised correlation peak the two signals are not the same performance. */
export const MIN_CORRELATION = 0.2;
/** Latencies searched, seconds either way (an interface round trip is a few milliseconds). */
export const MAX_LATENCY_SECONDS = 1;

export interface Alignment {
  /** The recording lags the reference by this many samples (fractional). */
  latencySamples: number;
  /** Peak of the normalised cross-correlation, -1..1. */
  correlation: number;
}

function fftSize(length: number): number {
  let size = 4;
  while (size < length) size *= 2;
  return size;
}

function spectrumOf(fft: RealFft, signal: Float64Array): Float64Array {
  const padded = new Float64Array(fft.size);
  padded.set(signal.subarray(0, Math.min(signal.length, fft.size)));
  const spectrum = new Float64Array(2 * fft.binCount);
  fft.complexSpectrum(padded, spectrum);
  return spectrum;
}

function energy(signal: Float64Array): number {
  let sum = 0;
  for (let n = 0; n < signal.length; n++) sum += signal[n] * signal[n];
  return sum;
}

/** Where `recording` lines up with `reference` (same rate); refuses recordings of another take. */
export function alignRecording(reference: Float64Array, recording: Float64Array, sampleRate: number, what: string): Alignment {
  const maxLag = Math.min(Math.round(MAX_LATENCY_SECONDS * sampleRate), Math.max(reference.length, recording.length) - 1);
  const fft = createRealFft(fftSize(reference.length + recording.length));
  const r = spectrumOf(fft, reference);
  const w = spectrumOf(fft, recording);
  // W conj(R): its inverse is c[k] = sum_n recording[n + k] reference[n].
  const product = new Float64Array(r.length);
  for (let k = 0; k < fft.binCount; k++) {
    const [rr, ri, wr, wi] = [r[2 * k], r[2 * k + 1], w[2 * k], w[2 * k + 1]];
    product[2 * k] = wr * rr + wi * ri;
    product[2 * k + 1] = wi * rr - wr * ri;
  }
  const c = new Float64Array(fft.size);
  fft.realSignal(product, c);
  const at = (lag: number): number => c[(lag + fft.size) % fft.size];
  let best = 0;
  for (let lag = -maxLag; lag <= maxLag; lag++) if (at(lag) > at(best)) best = lag;
  const norm = Math.sqrt(energy(reference) * energy(recording));
  const correlation = norm > 0 ? at(best) / norm : 0;
  if (!(correlation >= MIN_CORRELATION)) {
    throw new UserError(`${what}: does not correlate with the model's render of the dry take (peak correlation ${correlation.toFixed(3)}, need ${MIN_CORRELATION}): a recording of another take, or silence?`);
  }
  // Parabola through the peak and its neighbours.
  const [left, mid, right] = [at(best - 1), at(best), at(best + 1)];
  const curvature = left - 2 * mid + right;
  const offset = curvature < 0 ? (0.5 * (left - right)) / curvature : 0;
  return { latencySamples: best + Math.max(-0.5, Math.min(0.5, offset)), correlation };
}

/** `signal` advanced by `samples` (fractional): out[n] = signal(n + samples), by a linear phase; the length is kept, zeros beyond the end. */
export function advance(signal: Float64Array, samples: number): Float64Array {
  const fft = createRealFft(fftSize(signal.length + Math.ceil(Math.abs(samples)) + 1));
  const spectrum = spectrumOf(fft, signal);
  for (let k = 0; k < fft.binCount; k++) {
    // x(n + d) has spectrum X(k) e^{+j 2 pi k d / N}.
    const phase = (2 * Math.PI * k * samples) / fft.size;
    const [re, im] = [spectrum[2 * k], spectrum[2 * k + 1]];
    spectrum[2 * k] = re * Math.cos(phase) - im * Math.sin(phase);
    spectrum[2 * k + 1] = re * Math.sin(phase) + im * Math.cos(phase);
  }
  const full = new Float64Array(fft.size);
  fft.realSignal(spectrum, full);
  return full.slice(0, signal.length);
}
