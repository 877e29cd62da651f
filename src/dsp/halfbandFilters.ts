/**
 * Polyphase half-band interpolator (x2) and decimator (/2): the kernels of the oversampler.
 * Only the non-zero taps are computed: the interpolator's odd outputs and the decimator's centre
 * term are a plain delayed copy (h[M] = 1/2), the rest is one symmetric branch of 2K taps folded
 * into K multiplies (Crochiere & Rabiner, Multirate Digital Signal Processing, 1983, ch. 3).
 *
 * The arithmetic runs in WebAssembly SIMD kernels (src/wasm/halfbandWat.ts), two outputs per
 * instruction, each summed in the same order whatever the block size: block boundaries do not
 * change a single output bit.
 *
 * Each filter owns its input buffer: `historyLength` samples of past input followed by room for a
 * block, all in a `KernelArena` (one WebAssembly memory) shared by the filters of one oversampler.
 * The caller (or the previous filter in a cascade) writes new samples at `historyLength` and calls
 * `run`, whose output must also be a view of the arena; the history then moves to the front.
 * Nothing is allocated per block, and the state carries over exactly.
 */
import type { HalfbandDesign } from './halfband.js';
import { decimatorScratchLength } from '../wasm/halfbandWat.js';
import type { DecimateKernel, InterpolateKernel, KernelArena } from '../wasm/halfbandKernels.js';

/** K, the number of distinct taps of one half of the branch (armTaps holds 2K). */
function halfArmOf(design: HalfbandDesign): number {
  return design.armTaps.length / 2;
}

/** Past input an interpolator keeps: the branch spans 2K - 1 samples before the newest. */
function interpolatorHistory(halfArm: number): number {
  return 2 * halfArm - 1;
}

/** Past input a decimator keeps: the branch spans 2 (2K - 1) input samples, plus one of padding. */
function decimatorHistory(halfArm: number): number {
  return 2 * (2 * halfArm - 1) + 1;
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
  private readonly tapsAddress: number;
  private readonly bufferAddress: number;
  private readonly kernel: InterpolateKernel;

  /** Arena samples one interpolator takes (see `arenaLength`). */
  static arenaLengths(design: HalfbandDesign, maxInputLength: number): number[] {
    const halfArm = halfArmOf(design);
    // +1: an odd last output's SIMD partner reads one sample past the block.
    return [halfArm, interpolatorHistory(halfArm) + maxInputLength + 1];
  }

  constructor(
    design: HalfbandDesign,
    maxInputLength: number,
    private readonly arena: KernelArena,
  ) {
    const [, bufferLength] = HalfbandInterpolator.arenaLengths(design, maxInputLength);
    this.halfArm = halfArmOf(design);
    const taps = arena.allocate(this.halfArm); // 2 c[t], t = 0..K-1 (the other half is the mirror image)
    for (let t = 0; t < this.halfArm; t++) taps[t] = 2 * design.armTaps[t];
    this.historyLength = interpolatorHistory(this.halfArm);
    this.buffer = arena.allocate(bufferLength);
    this.tapsAddress = arena.address(taps, 0);
    this.bufferAddress = arena.address(this.buffer, 0);
    this.kernel = arena.interpolator(this.halfArm);
  }

  run(count: number, output: Float64Array, outputOffset: number): void {
    this.kernel(this.bufferAddress, this.tapsAddress, this.halfArm, count, this.arena.address(output, outputOffset));
    this.buffer.copyWithin(0, count, count + this.historyLength);
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
  private readonly tapsAddress: number;
  private readonly bufferAddress: number;
  private readonly scratchAddress: number;
  private readonly kernel: DecimateKernel;

  /** Arena samples one decimator takes (see `arenaLength`). */
  static arenaLengths(design: HalfbandDesign, maxOutputLength: number): number[] {
    const halfArm = halfArmOf(design);
    return [halfArm, decimatorHistory(halfArm) + 2 * maxOutputLength, decimatorScratchLength(maxOutputLength, halfArm)];
  }

  constructor(
    design: HalfbandDesign,
    maxOutputLength: number,
    private readonly extraDelay: 0 | 1,
    private readonly arena: KernelArena,
  ) {
    const [, bufferLength, scratchLength] = HalfbandDecimator.arenaLengths(design, maxOutputLength);
    this.halfArm = halfArmOf(design);
    const taps = arena.allocate(this.halfArm); // c[t], t = 0..K-1 (the other half is the mirror image)
    taps.set(design.armTaps.subarray(0, this.halfArm));
    this.historyLength = decimatorHistory(this.halfArm);
    this.buffer = arena.allocate(bufferLength);
    this.tapsAddress = arena.address(taps, 0);
    this.bufferAddress = arena.address(this.buffer, 0);
    this.scratchAddress = arena.address(arena.allocate(scratchLength), 0);
    this.kernel = arena.decimator(this.halfArm);
  }

  run(count: number, output: Float64Array, outputOffset: number): void {
    const start = this.historyLength - this.extraDelay;
    this.kernel(this.bufferAddress, start, this.tapsAddress, this.halfArm, count, this.arena.address(output, outputOffset), this.scratchAddress);
    this.buffer.copyWithin(0, 2 * count, 2 * count + this.historyLength);
  }

  reset(): void {
    this.buffer.fill(0);
  }
}
