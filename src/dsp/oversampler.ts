/**
 * Linear-phase oversampling by a cascade of x2 half-band stages (docs/models.md, "Oversampling").
 * Stage j runs between 2^(j-1) and 2^j times the base rate. Each stage only has to keep the audio
 * band [0, passband] clean: the images of that band (upsampling) and whatever would fold onto it
 * (downsampling) lie above 2^(j-1) fs - passband, so the transition band of stage j runs from the
 * passband edge to there. The first stage is steep; later stages have wide transition bands and only
 * a handful of taps (Crochiere & Rabiner, Multirate Digital Signal Processing, 1983, ch. 5, on
 * multistage decimation and interpolation).
 *
 * The round trip up -> down delays the signal by a whole number of base-rate samples,
 * `latencyBaseSamples`: each decimator may add one sample of padding at its input rate, chosen so the
 * stage delays (2 M_j + pad_j) / 2^j sum to an integer.
 */
import { designHalfband } from './halfband.js';
import { HalfbandDecimator, HalfbandInterpolator } from './halfbandFilters.js';
import { arenaLength, KernelArena } from '../wasm/halfbandKernels.js';
import { AUDIO_BAND_HIGH_HZ } from './audioBand.js';

export type OversampleFactor = 1 | 2 | 4 | 8 | 16;
export const OVERSAMPLE_FACTORS: readonly OversampleFactor[] = [1, 2, 4, 8, 16];

/** Audio band kept flat and alias-free, at 44.1 kHz and above; scaled with the rate below that. */
export const PASSBAND_EDGE_HZ = AUDIO_BAND_HIGH_HZ;
const PASSBAND_EDGE_FRACTION_MIN_RATE = PASSBAND_EDGE_HZ / 44100;
/** Stopband attenuation of every stage, measured on its design (the requirement is >= 100 dB; 1 dB margin). */
export const STOPBAND_ATTENUATION_DB = 101;

export interface Oversampler {
  readonly factor: OversampleFactor;
  /** Delay of upsample followed by downsample, in base-rate samples (a whole number). */
  readonly latencyBaseSamples: number;
  /**
   * Upsample `input` (base rate, at most maxBlockSize samples) into the first factor * input.length
   * samples of `output`.
   */
  upsample(input: Float64Array, output: Float64Array): void;
  /**
   * Downsample the first factor * output.length samples of `input` into `output` (base rate, at
   * most maxBlockSize samples).
   */
  downsample(input: Float64Array, output: Float64Array): void;
  /**
   * A view of `factor * baseLength` samples of the oversampler's own storage. Upsampling into it,
   * processing it in place and downsampling from it saves the copy into the decimator's input. The
   * full-size view is made once; only other lengths allocate a new view.
   */
  oversampledBlock(baseLength: number): Float64Array;
  reset(): void;
}

/**
 * `baseSampleRateHz` sets the steepness of the first stage (the band from 20 kHz to the base
 * Nyquist); the default, 44.1 kHz, is the steepest case and is also correct for every higher rate.
 */
export function createOversampler(
  factor: OversampleFactor,
  maxBlockSize: number,
  baseSampleRateHz = 44100,
): Oversampler {
  const stageCount = Math.log2(factor);
  if (!Number.isInteger(stageCount) || stageCount < 0 || stageCount > 4) {
    throw new RangeError(`oversampling factor must be 1, 2, 4, 8 or 16, got ${factor}`);
  }
  if (!Number.isInteger(maxBlockSize) || maxBlockSize < 1) {
    throw new RangeError(`oversampler block size must be a positive integer, got ${maxBlockSize}`);
  }
  if (!(baseSampleRateHz > 0)) throw new RangeError(`base sample rate must be positive, got ${baseSampleRateHz}`);
  const passbandHz = Math.min(PASSBAND_EDGE_HZ, baseSampleRateHz * PASSBAND_EDGE_FRACTION_MIN_RATE);

  const designs = [];
  for (let j = 1; j <= stageCount; j++) {
    const stageRateHz = baseSampleRateHz * 2 ** j;
    designs.push(designHalfband(0.5 - (2 * passbandHz) / stageRateHz, STOPBAND_ATTENUATION_DB));
  }
  // Latency in units of 1 / factor base samples: stage j contributes (2 M_j + pad_j) * 2^(J - j).
  const unpadded = designs.reduce((sum, d, i) => sum + 2 * d.delaySamples * 2 ** (stageCount - 1 - i), 0);
  const padding = (factor - (unpadded % factor)) % factor;
  const latencyBaseSamples = (unpadded + padding) / factor;

  // interpolators[i] and decimators[i] run between 2^i and 2^(i+1) times the base rate; their
  // buffers, and the base-rate block the last decimator writes, share one kernel arena.
  const decimatorPads = designs.map((_, i) => ((padding >> (stageCount - 1 - i)) & 1) as 0 | 1);
  const arena = new KernelArena(
    arenaLength([
      maxBlockSize,
      ...designs.flatMap((d, i) => [
        ...HalfbandInterpolator.arenaLengths(d, maxBlockSize * 2 ** i),
        ...HalfbandDecimator.arenaLengths(d, maxBlockSize * 2 ** i),
      ]),
    ]),
  );
  const baseBlock = arena.allocate(maxBlockSize);
  const interpolators: HalfbandInterpolator[] = [];
  const decimators: HalfbandDecimator[] = [];
  designs.forEach((d, i) => {
    interpolators.push(new HalfbandInterpolator(d, maxBlockSize * 2 ** i, arena));
    decimators.push(new HalfbandDecimator(d, maxBlockSize * 2 ** i, decimatorPads[i], arena));
  });
  // The top decimator's input area doubles as the oversampled block (factor 1: a plain buffer).
  const top = decimators[stageCount - 1];
  const fastStorage = top ? top.buffer : new Float64Array(maxBlockSize);
  const fastOffset = top ? top.historyLength : 0;
  const fullBlock = fastStorage.subarray(fastOffset, fastOffset + maxBlockSize * factor);

  function checkLengths(baseLength: number, fastLength: number, what: string): void {
    if (baseLength > maxBlockSize) {
      throw new RangeError(`oversampler ${what}: block of ${baseLength} samples exceeds the maximum ${maxBlockSize}`);
    }
    if (fastLength < baseLength * factor) {
      throw new RangeError(`oversampler ${what}: oversampled buffer holds ${fastLength} samples, needs ${baseLength * factor}`);
    }
  }

  return {
    factor,
    latencyBaseSamples,
    oversampledBlock(baseLength: number): Float64Array {
      if (baseLength === maxBlockSize) return fullBlock;
      checkLengths(baseLength, Infinity, 'block');
      return fastStorage.subarray(fastOffset, fastOffset + baseLength * factor);
    },
    upsample(input: Float64Array, output: Float64Array): void {
      const count = input.length;
      checkLengths(count, output.length, 'upsample');
      if (stageCount === 0) {
        output.set(input);
        return;
      }
      interpolators[0].buffer.set(input, interpolators[0].historyLength);
      for (let i = 0; i < stageCount - 1; i++) {
        const next = interpolators[i + 1];
        interpolators[i].run(count << i, next.buffer, next.historyLength);
      }
      // The kernels write into the arena only: other outputs get a copy of the oversampled block.
      const direct = output.buffer === fastStorage.buffer;
      const target = direct ? output : fullBlock;
      interpolators[stageCount - 1].run(count << (stageCount - 1), target, 0);
      if (!direct) output.set(fullBlock.subarray(0, count * factor));
    },
    downsample(input: Float64Array, output: Float64Array): void {
      const count = output.length;
      checkLengths(count, input.length, 'downsample');
      if (!top) {
        for (let n = 0; n < count; n++) output[n] = input[n];
        return;
      }
      const fastCount = count * factor;
      const inPlace = input.buffer === fastStorage.buffer && input.byteOffset === fullBlock.byteOffset;
      if (!inPlace) top.buffer.set(input.length === fastCount ? input : input.subarray(0, fastCount), top.historyLength);
      for (let i = stageCount - 1; i > 0; i--) {
        const next = decimators[i - 1];
        decimators[i].run(count << i, next.buffer, next.historyLength);
      }
      decimators[0].run(count, baseBlock, 0);
      output.set(count === baseBlock.length ? baseBlock : baseBlock.subarray(0, count));
    },
    reset(): void {
      for (const filter of interpolators) filter.reset();
      for (const filter of decimators) filter.reset();
    },
  };
}
