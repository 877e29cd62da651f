/**
 * Polyphase half-band interpolator (x2) and decimator (/2): the kernels of the oversampler.
 * Only the non-zero taps are computed: the interpolator's odd outputs and the decimator's centre
 * term are a plain delayed copy (h[M] = 1/2), the rest is one symmetric branch of 2K taps folded
 * into K multiplies (Crochiere & Rabiner, Multirate Digital Signal Processing, 1983, ch. 3).
 *
 * Arms up to MAX_UNROLLED_HALF_ARM taps (every stage after the first) run a kernel generated for
 * their K at construction (see `unrolledKernel`): taps and the input window in locals, one new
 * sample loaded per output. Longer arms run the general loop. Both sum in the same order, so the
 * kernel choice does not change a bit of the output.
 *
 * Each filter owns its input buffer: `historyLength` samples of past input followed by room for a
 * block. The caller (or the previous filter in a cascade) writes new samples at `historyLength` and
 * calls `run`; the history then moves to the front. Nothing is allocated per block, and the state
 * carries over exactly, so block boundaries do not change a single output bit.
 */
import type { HalfbandDesign } from './halfband.js';

/**
 * Longest arm half (K taps) that gets a generated kernel. Its code grows as K^2 (2K unrolled steps of
 * K products): measured in one process, best of 15, the K = 5 and 7 stages of the 8x cascade run in
 * 0.6-0.7 of the general loop's time. K = 20 (the first stage at 48 kHz) would gain as much, but its
 * kernel is 42 KB of bytecode and takes about 0.25 s to optimise, and K = 36 (44.1 kHz) exceeds what
 * V8 optimises at all (it then runs 40 times slower), so long arms keep the general loop.
 */
export const MAX_UNROLLED_HALF_ARM = 8;

/**
 * A generated kernel: `count` outputs, reading the input window that ends at `newest` (the newest
 * sample of the first output) and moves by `stride` samples per output.
 */
type UnrolledKernel = (
  buffer: Float64Array,
  taps: Float64Array,
  newest: number,
  count: number,
  output: Float64Array,
  outputOffset: number,
) => void;

const kernelCache = new Map<string, UnrolledKernel>();

/**
 * The kernel for arm half K, generated once per (kind, K) and shared. Window w_j = x[newest - stride j],
 * j = 0..2K-1, in 2K locals; per output one new w_0 is loaded. Output:
 *   interpolator (stride 1): y[2n] = sum_t c_t (w_t + w_{2K-1-t}),  y[2n+1] = w_{K-1}
 *   decimator (stride 2):    y[n] = x[newest - M] / 2 + sum_t c_t (w_t + w_{2K-1-t})
 * i.e. the general loops below with every index a constant, summed in the same order. Rather than
 * shifting the window by one local per output (2K - 1 moves), the loop is unrolled 2K times and
 * each step loads the new sample into the local that held the oldest: at step r, w_j lives in local
 * s[(r - j) mod 2K], so after 2K steps every local is back in its role. The last count mod 2K
 * outputs run the first steps of the same sequence, each behind a test.
 */
function unrolledKernel(kind: 'interpolator' | 'decimator', halfArm: number, delay: number): UnrolledKernel {
  const key = `${kind} ${halfArm} ${delay}`;
  const cached = kernelCache.get(key);
  if (cached) return cached;
  const width = 2 * halfArm;
  const stride = kind === 'interpolator' ? 1 : 2;
  const range = (length: number): number[] => Array.from({ length }, (_, i) => i);
  const local = (j: number, r: number): string => `s${(((r - j) % width) + width) % width}`;
  const step = (r: number): string => {
    const at = `n + ${r}`;
    const products = range(halfArm).map((t) => `c${t} * (${local(t, r)} + ${local(width - 1 - t, r)})`);
    return kind === 'interpolator'
      ? [
          `${local(0, r)} = buffer[newest + ${at}];`,
          `output[outputOffset + 2 * (${at})] = ${products.join(' + ')};`,
          `output[outputOffset + 2 * (${at}) + 1] = ${local(halfArm - 1, r)};`,
        ].join('\n')
      : [
          `${local(0, r)} = buffer[newest + 2 * (${at})];`,
          `output[outputOffset + ${at}] = 0.5 * buffer[newest + 2 * (${at}) - ${delay}] + ${products.join(' + ')};`,
        ].join('\n');
  };
  const source = [
    ...range(halfArm).map((t) => `const c${t} = taps[${t}];`),
    `let s0 = 0;`,
    ...range(width - 1).map((j) => `let ${local(j + 1, 0)} = buffer[newest - ${stride * (j + 1)}];`),
    `let n = 0;`,
    `for (; n + ${width} <= count; n += ${width}) {`,
    ...range(width).map(step),
    `}`,
    `const rest = count - n;`,
    ...range(width - 1).map((r) => `if (rest > ${r}) {\n${step(r)}\n}`),
  ].join('\n');
  const kernel = new Function('buffer', 'taps', 'newest', 'count', 'output', 'outputOffset', source) as UnrolledKernel;
  kernelCache.set(key, kernel);
  return kernel;
}

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
  private readonly kernel: UnrolledKernel | null;

  constructor(design: HalfbandDesign, maxInputLength: number) {
    this.halfArm = design.armTaps.length / 2;
    this.taps = design.armTaps.map((c) => 2 * c).slice(0, this.halfArm);
    this.historyLength = 2 * this.halfArm - 1;
    this.buffer = new Float64Array(this.historyLength + maxInputLength);
    this.kernel = this.halfArm <= MAX_UNROLLED_HALF_ARM ? unrolledKernel('interpolator', this.halfArm, 0) : null;
  }

  run(count: number, output: Float64Array, outputOffset: number): void {
    const { buffer, taps, historyLength, halfArm } = this;
    if (this.kernel !== null) {
      this.kernel(buffer, taps, historyLength, count, output, outputOffset);
      buffer.copyWithin(0, count, count + historyLength);
      return;
    }
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
  private readonly kernel: UnrolledKernel | null;

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
    this.kernel = this.halfArm <= MAX_UNROLLED_HALF_ARM ? unrolledKernel('decimator', this.halfArm, this.delay) : null;
  }

  run(count: number, output: Float64Array, outputOffset: number): void {
    const { buffer, taps, historyLength, halfArm, delay, span } = this;
    const start = historyLength - this.extraDelay;
    if (this.kernel !== null) {
      this.kernel(buffer, taps, start, count, output, outputOffset);
      buffer.copyWithin(0, 2 * count, 2 * count + historyLength);
      return;
    }
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
