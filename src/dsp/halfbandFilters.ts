/**
 * Polyphase half-band interpolator (x2) and decimator (/2): the kernels of the oversampler.
 * Only the non-zero taps are computed: the interpolator's odd outputs and the decimator's centre
 * term are a plain delayed copy (h[M] = 1/2), the rest is one symmetric branch of 2K taps folded
 * into K multiplies (Crochiere & Rabiner, Multirate Digital Signal Processing, 1983, ch. 3).
 *
 * Each filter owns its input buffer: `historyLength` samples of past input followed by room for a
 * block. The caller (or the previous filter in a cascade) writes new samples at `historyLength` and
 * calls `run`; the history then moves to the front. Nothing is allocated per block, and the state
 * carries over exactly, so block boundaries do not change a single output bit.
 */
import type { HalfbandDesign } from './halfband.js';

export interface HalfbandFilter {
  /** Input buffer: `historyLength` past samples, then the new block. */
  readonly buffer: Float64Array;
  readonly historyLength: number;
  /** Process `count` outputs' worth of input already placed in `buffer`; write to `output` at `outputOffset`. */
  run(count: number, output: Float64Array, outputOffset: number): void;
  reset(): void;
}

/**
 * x2 interpolator, gain 2 (so the zero-stuffed signal keeps its level). `count` input samples give
 * 2 count outputs. With taps c[t] = armTaps[t]:
 *   y[2n]     = 2 sum_t c[t] x[n - t]
 *   y[2n + 1] = x[n - (K - 1)]          (the centre tap, 2 * 1/2)
 * Delay: M = 2K - 1 samples at the output rate.
 */
export class HalfbandInterpolator implements HalfbandFilter {
  readonly buffer: Float64Array;
  readonly historyLength: number;
  private readonly halfArm: number;
  private readonly taps: Float64Array; // 2 c[t], t = 0..K-1 (the other half is the mirror image)

  constructor(design: HalfbandDesign, maxInputLength: number) {
    this.halfArm = design.armTaps.length / 2;
    this.taps = design.armTaps.map((c) => 2 * c).slice(0, this.halfArm);
    this.historyLength = 2 * this.halfArm - 1;
    this.buffer = new Float64Array(this.historyLength + maxInputLength);
  }

  run(count: number, output: Float64Array, outputOffset: number): void {
    const { buffer, taps, historyLength, halfArm } = this;
    const last = 2 * halfArm - 1;
    const centre = halfArm - 1;
    let n = 0;
    // Four outputs at a time: four independent sums share each tap. Tap t of outputs n..n+3 reads
    // x[n - t .. n + 3 - t] and x[n - last + t .. n + 3 - last + t]; both windows slide by one
    // sample per tap, so each tap loads two new samples and keeps the rest in locals. Every output
    // is summed in the same order as in the one-at-a-time tail: results do not depend on block size.
    for (; n + 4 <= count; n += 4) {
      const newest = historyLength + n;
      const oldest = newest - last;
      let acc0 = 0;
      let acc1 = 0;
      let acc2 = 0;
      let acc3 = 0;
      let hi0 = 0;
      let hi1 = buffer[newest + 1];
      let hi2 = buffer[newest + 2];
      let hi3 = buffer[newest + 3];
      let lo0 = buffer[oldest];
      let lo1 = buffer[oldest + 1];
      let lo2 = buffer[oldest + 2];
      let lo3 = 0;
      for (let t = 0; t < halfArm; t++) {
        const c = taps[t];
        hi0 = buffer[newest - t];
        lo3 = buffer[oldest + t + 3];
        acc0 += c * (hi0 + lo0);
        acc1 += c * (hi1 + lo1);
        acc2 += c * (hi2 + lo2);
        acc3 += c * (hi3 + lo3);
        hi3 = hi2;
        hi2 = hi1;
        hi1 = hi0;
        lo0 = lo1;
        lo1 = lo2;
        lo2 = lo3;
      }
      const o = outputOffset + 2 * n;
      const delayed = newest - centre;
      output[o] = acc0;
      output[o + 1] = buffer[delayed];
      output[o + 2] = acc1;
      output[o + 3] = buffer[delayed + 1];
      output[o + 4] = acc2;
      output[o + 5] = buffer[delayed + 2];
      output[o + 6] = acc3;
      output[o + 7] = buffer[delayed + 3];
    }
    for (; n < count; n++) {
      const newest = historyLength + n;
      let acc = 0;
      for (let t = 0; t < halfArm; t++) acc += taps[t] * (buffer[newest - t] + buffer[newest - last + t]);
      const o = outputOffset + 2 * n;
      output[o] = acc;
      output[o + 1] = buffer[newest - centre];
    }
    buffer.copyWithin(0, count, count + historyLength);
  }

  reset(): void {
    this.buffer.fill(0);
  }
}

/**
 * /2 decimator, gain 1. `count` outputs consume 2 count input samples. With f the filtered input,
 * z[n] = f[2n - extraDelay], extraDelay 0 or 1 (one input-rate sample of padding, chosen by the
 * cascade to make its total latency whole):
 *   f[m] = sum_t c[t] v[m - 2t] + v[m - M] / 2
 * Delay: M + extraDelay samples at the input rate.
 */
export class HalfbandDecimator implements HalfbandFilter {
  readonly buffer: Float64Array;
  readonly historyLength: number;
  private readonly halfArm: number;
  private readonly taps: Float64Array; // c[t], t = 0..K-1 (the other half is the mirror image)
  private readonly delay: number;
  private readonly span: number; // distance from the newest to the oldest tap of the branch

  constructor(
    design: HalfbandDesign,
    maxOutputLength: number,
    private readonly extraDelay: 0 | 1,
  ) {
    this.halfArm = design.armTaps.length / 2;
    this.taps = design.armTaps.slice(0, this.halfArm);
    this.delay = design.delaySamples;
    this.span = 2 * (2 * this.halfArm - 1);
    this.historyLength = this.span + 1;
    this.buffer = new Float64Array(this.historyLength + 2 * maxOutputLength);
  }

  run(count: number, output: Float64Array, outputOffset: number): void {
    const { buffer, taps, historyLength, halfArm, delay, span } = this;
    const start = historyLength - this.extraDelay;
    let n = 0;
    // Four outputs at a time with sliding windows, as in the interpolator (here the windows step by
    // two input samples per tap), summed in the same order as the one-at-a-time tail.
    for (; n + 4 <= count; n += 4) {
      const newest = start + 2 * n;
      const oldest = newest - span;
      let acc0 = 0.5 * buffer[newest - delay];
      let acc1 = 0.5 * buffer[newest + 2 - delay];
      let acc2 = 0.5 * buffer[newest + 4 - delay];
      let acc3 = 0.5 * buffer[newest + 6 - delay];
      let hi0 = 0;
      let hi1 = buffer[newest + 2];
      let hi2 = buffer[newest + 4];
      let hi3 = buffer[newest + 6];
      let lo0 = buffer[oldest];
      let lo1 = buffer[oldest + 2];
      let lo2 = buffer[oldest + 4];
      let lo3 = 0;
      for (let t = 0; t < halfArm; t++) {
        const c = taps[t];
        hi0 = buffer[newest - 2 * t];
        lo3 = buffer[oldest + 2 * t + 6];
        acc0 += c * (hi0 + lo0);
        acc1 += c * (hi1 + lo1);
        acc2 += c * (hi2 + lo2);
        acc3 += c * (hi3 + lo3);
        hi3 = hi2;
        hi2 = hi1;
        hi1 = hi0;
        lo0 = lo1;
        lo1 = lo2;
        lo2 = lo3;
      }
      const o = outputOffset + n;
      output[o] = acc0;
      output[o + 1] = acc1;
      output[o + 2] = acc2;
      output[o + 3] = acc3;
    }
    for (; n < count; n++) {
      const newest = start + 2 * n;
      let acc = 0.5 * buffer[newest - delay];
      for (let t = 0; t < halfArm; t++) acc += taps[t] * (buffer[newest - 2 * t] + buffer[newest - span + 2 * t]);
      output[outputOffset + n] = acc;
    }
    buffer.copyWithin(0, 2 * count, 2 * count + historyLength);
  }

  reset(): void {
    this.buffer.fill(0);
  }
}
