/**
 * Harmonic analysis of a steady-state tone: fundamental (sub-bin), harmonic table, THD, THD+N and
 * the even/odd share of the harmonic energy.
 *
 * Method: remove the mean, window with the 4-term Blackman-Harris window (side lobes -92 dB, Harris
 * 1978), take one FFT. Each component's power is the sum of the power bins over its main lobe (the
 * window's main lobe is 4 bins either side), so a component between bins reads its full level
 * (Parseval over the lobe): mean square = 2 sum|X_k|^2 / (N sum w^2), peak amplitude = sqrt(2 x that).
 * The fundamental frequency comes from Gaussian (log-parabolic) interpolation of the peak bin.
 * Measurement floor: the window's energy outside its main lobe sets THD+N's floor near -90 dB
 * (about 0.003 %); THD reads down to about -130 dBc.
 *
 * THD (ratio to the fundamental) = sqrt(sum_{k>=2} V_k^2) / V_1. THD+N = everything but the
 * fundamental in 20 Hz-20 kHz over the total in that band (AES17 measurement practice).
 */
import { createRealFft, floorPowerOfTwo } from '../dsp/fft.js';
import { blackmanHarrisWindow, windowEnergy } from '../dsp/windows.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

export interface Harmonic {
  /** Harmonic number: 2 = second harmonic. */
  order: number;
  hz: number;
  /** Level relative to the fundamental, dB (floored at DBC_FLOOR). */
  dbc: number;
  /** Peak amplitude in the signal's units (volts for a signal in volts). */
  volts: number;
}

export interface HarmonicReport {
  fundamentalHz: number;
  /** Peak amplitude of the fundamental in the signal's units. */
  fundamentalVolts: number;
  thdPercent: number;
  thdnPercent: number;
  /** Orders 2..N up to `maxHz` (and below Nyquist). */
  harmonics: Harmonic[];
  /** Share of the harmonic energy (orders >= 2) in even orders, 0..1 (0 when there is none). */
  evenShare: number;
  /** Share of the harmonic energy in odd orders >= 3, 0..1. */
  oddShare: number;
}

export interface HarmonicOptions {
  /** Look for the fundamental near this frequency instead of taking the strongest peak. */
  fundamentalHz?: number;
  /** Highest harmonic frequency to list (default 20 kHz, never above Nyquist). */
  maxHz?: number;
}

/** Bins summed either side of a component: the Blackman-Harris main lobe is +-4 bins, plus one for rounding. */
export const LOBE_HALF_WIDTH_BINS = 5;
/** Longest FFT used (2^17 = 2.7 s at 48 kHz): enough resolution, bounded cost. */
const MAX_FFT_SIZE = 1 << 17;
const MIN_FFT_SIZE = 1024;
/**
 * Bias bound of the interpolated fundamental, in bins (measured about 0.003 for Blackman-Harris):
 * order k's predicted bin may be off by k times this, so high orders re-centre on their local peak
 * within that many bins (at most 2, keeping clear of neighbouring harmonics).
 */
const FUNDAMENTAL_BIN_UNCERTAINTY = 0.005;
const MAX_RECENTRE_BINS = 2;
/** Search half-width around a given fundamental, as a fraction of it. */
const FUNDAMENTAL_SEARCH_FRACTION = 0.03;
/** Level reported for a harmonic with no energy at all (dB re fundamental), keeping JSON finite. */
export const DBC_FLOOR = -240;

/** Windowed power spectrum of the centre power-of-two segment of `signal`, mean removed. */
interface Spectrum {
  power: Float64Array;
  binHz: number;
  fftSize: number;
  /** Divide a lobe power sum by this to get the component's mean square. */
  meanSquarePerPower: number;
}

function analyseSpectrum(signal: Float64Array, sampleRate: number): Spectrum {
  if (signal.length < MIN_FFT_SIZE) {
    throw new RangeError(`harmonic analysis needs at least ${MIN_FFT_SIZE} samples, got ${signal.length}`);
  }
  const fftSize = Math.min(floorPowerOfTwo(signal.length), MAX_FFT_SIZE);
  const start = Math.floor((signal.length - fftSize) / 2);
  let mean = 0;
  for (let n = 0; n < fftSize; n++) mean += signal[start + n];
  mean /= fftSize;
  const window = blackmanHarrisWindow(fftSize);
  const frame = new Float64Array(fftSize);
  for (let n = 0; n < fftSize; n++) frame[n] = (signal[start + n] - mean) * window[n];
  const fft = createRealFft(fftSize);
  const power = new Float64Array(fft.binCount);
  fft.powerSpectrum(frame, power);
  return { power, binHz: sampleRate / fftSize, fftSize, meanSquarePerPower: (fftSize * windowEnergy(window)) / 2 };
}

function sumBins(power: Float64Array, from: number, to: number): number {
  let sum = 0;
  for (let k = Math.max(0, from); k <= Math.min(power.length - 1, to); k++) sum += power[k];
  return sum;
}

function lobePower(power: Float64Array, centreBin: number): number {
  return sumBins(power, centreBin - LOBE_HALF_WIDTH_BINS, centreBin + LOBE_HALF_WIDTH_BINS);
}

/** Strongest bin within +-reach of `bin`. */
function localPeakBin(power: Float64Array, bin: number, reach: number): number {
  let peak = bin;
  for (let k = Math.max(0, bin - reach); k <= Math.min(power.length - 1, bin + reach); k++) if (power[k] > power[peak]) peak = k;
  return peak;
}

/** Peak bin in [from, to] refined by Gaussian interpolation (parabola through the log powers). */
function interpolatedPeakBin(power: Float64Array, from: number, to: number): number {
  let peak = from;
  for (let k = from + 1; k <= to; k++) if (power[k] > power[peak]) peak = k;
  if (power[peak] <= 0 || peak === 0 || peak === power.length - 1) return peak;
  const left = Math.log(Math.max(power[peak - 1], Number.MIN_VALUE));
  const centre = Math.log(power[peak]);
  const right = Math.log(Math.max(power[peak + 1], Number.MIN_VALUE));
  const curvature = left - 2 * centre + right;
  if (curvature >= 0) return peak;
  const offset = (0.5 * (left - right)) / curvature;
  return peak + Math.max(-0.5, Math.min(0.5, offset));
}

/** Measures the fundamental and its harmonics in a steady-state `signal` (use whole settled periods or more). */
export function measureHarmonics(signal: Float64Array, sampleRate: number, options: HarmonicOptions = {}): HarmonicReport {
  const nyquistHz = sampleRate / 2;
  const maxHz = Math.min(options.maxHz ?? AUDIO_BAND_HIGH_HZ, nyquistHz);
  const { power, binHz, meanSquarePerPower } = analyseSpectrum(signal, sampleRate);
  const lastBin = power.length - 1;
  const lowestBin = Math.max(2 * LOBE_HALF_WIDTH_BINS, Math.ceil(AUDIO_BAND_LOW_HZ / binHz));

  let searchFrom = lowestBin;
  let searchTo = Math.min(lastBin - LOBE_HALF_WIDTH_BINS, Math.floor(maxHz / binHz));
  if (options.fundamentalHz !== undefined) {
    const halfWidthBins = Math.max(LOBE_HALF_WIDTH_BINS, (FUNDAMENTAL_SEARCH_FRACTION * options.fundamentalHz) / binHz);
    searchFrom = Math.max(searchFrom, Math.floor(options.fundamentalHz / binHz - halfWidthBins));
    searchTo = Math.min(lastBin - LOBE_HALF_WIDTH_BINS, Math.ceil(options.fundamentalHz / binHz + halfWidthBins));
  }
  if (searchTo < searchFrom) {
    const lowHz = (lowestBin * binHz).toFixed(1);
    const highHz = ((lastBin - LOBE_HALF_WIDTH_BINS) * binHz).toFixed(0);
    throw new RangeError(`the fundamental must lie between ${lowHz} Hz and ${highHz} Hz for this signal`);
  }
  const fundamentalBin = interpolatedPeakBin(power, searchFrom, searchTo);
  if (fundamentalBin < 2 * LOBE_HALF_WIDTH_BINS + 1) {
    throw new RangeError(
      `fundamental at ${(fundamentalBin * binHz).toFixed(2)} Hz is too low to resolve its harmonics with ${binHz.toFixed(3)} Hz bins; give a longer signal`,
    );
  }
  const fundamentalHz = fundamentalBin * binHz;
  const fundamentalPower = lobePower(power, Math.round(fundamentalBin));
  if (!(fundamentalPower > 0)) throw new RangeError('no fundamental: the signal is silent');
  const amplitudeOf = (lobe: number): number => Math.sqrt((2 * lobe) / meanSquarePerPower);

  const harmonics: Harmonic[] = [];
  let harmonicPower = 0;
  let evenPower = 0;
  for (let order = 2; order * fundamentalHz <= maxHz; order++) {
    const predicted = Math.round(order * fundamentalBin);
    if (predicted + LOBE_HALF_WIDTH_BINS + MAX_RECENTRE_BINS > lastBin) break;
    const reach = Math.min(MAX_RECENTRE_BINS, Math.floor(order * FUNDAMENTAL_BIN_UNCERTAINTY));
    const centre = reach > 0 ? localPeakBin(power, predicted, reach) : predicted;
    const lobe = lobePower(power, centre);
    harmonicPower += lobe;
    if (order % 2 === 0) evenPower += lobe;
    const dbc = lobe > 0 ? Math.max(DBC_FLOOR, 10 * Math.log10(lobe / fundamentalPower)) : DBC_FLOOR;
    harmonics.push({ order, hz: order * fundamentalHz, dbc, volts: amplitudeOf(lobe) });
  }

  const bandFrom = Math.ceil(AUDIO_BAND_LOW_HZ / binHz);
  const bandTo = Math.min(lastBin, Math.floor(AUDIO_BAND_HIGH_HZ / binHz));
  const bandPower = sumBins(power, bandFrom, bandTo);
  const residualPower = Math.max(0, bandPower - fundamentalPower);

  return {
    fundamentalHz,
    fundamentalVolts: amplitudeOf(fundamentalPower),
    thdPercent: 100 * Math.sqrt(harmonicPower / fundamentalPower),
    thdnPercent: bandPower > 0 ? 100 * Math.sqrt(residualPower / bandPower) : 0,
    harmonics,
    evenShare: harmonicPower > 0 ? evenPower / harmonicPower : 0,
    oddShare: harmonicPower > 0 ? (harmonicPower - evenPower) / harmonicPower : 0,
  };
}
