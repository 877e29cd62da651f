/**
 * Loads the half-band kernels (built from halfbandWat.ts into dist/wasm by `npm run build`) and
 * gives each oversampler its own WebAssembly memory: the filters' buffers are Float64Array views
 * of it, so the kernels read and write them directly. The memory is sized once and never grown
 * (growing would detach every view).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { kernelName } from './halfbandWat.js';

/** The same place from src/wasm (tests) and dist/wasm (the program). */
export const HALFBAND_KERNELS_PATH = fileURLToPath(new URL('../../dist/wasm/halfbandKernels.wasm', import.meta.url));

/** (buffer, taps, K, count, out): byte addresses except K and count. */
export type InterpolateKernel = (buffer: number, taps: number, halfArm: number, count: number, out: number) => void;
/** (buffer, start, taps, K, count, out, scratch): `start` is a sample index into the buffer. */
export type DecimateKernel = (
  buffer: number,
  start: number,
  taps: number,
  halfArm: number,
  count: number,
  out: number,
  scratch: number,
) => void;

let compiled: WebAssembly.Module | undefined;

function kernelModule(): WebAssembly.Module {
  if (compiled === undefined) {
    let bytes: Buffer;
    try {
      bytes = readFileSync(HALFBAND_KERNELS_PATH);
    } catch {
      throw new Error(`${HALFBAND_KERNELS_PATH} is missing: run "npm run build"`);
    }
    compiled = new WebAssembly.Module(bytes);
  }
  return compiled;
}

const BYTES_PER_SAMPLE = Float64Array.BYTES_PER_ELEMENT;
const WASM_PAGE_BYTES = 65536;

/** Samples an arena needs for views of these lengths (each rounded up to 16 bytes). */
export function arenaLength(lengths: readonly number[]): number {
  return lengths.reduce((sum, length) => sum + ((length + 1) & ~1), 0);
}

/** One memory with the kernels bound to it; `allocate` hands out 16-byte-aligned views in order. */
export class KernelArena {
  readonly memory: WebAssembly.Memory;
  private readonly exports: WebAssembly.Exports;
  private readonly capacity: number;
  private used = 0; // samples

  constructor(samples: number) {
    this.capacity = samples;
    this.memory = new WebAssembly.Memory({ initial: Math.max(1, Math.ceil((samples * BYTES_PER_SAMPLE) / WASM_PAGE_BYTES)) });
    this.exports = new WebAssembly.Instance(kernelModule(), { env: { memory: this.memory } }).exports;
  }

  allocate(length: number): Float64Array {
    const rounded = (length + 1) & ~1;
    if (this.used + rounded > this.capacity) throw new RangeError(`kernel arena of ${this.capacity} samples is full`);
    const view = new Float64Array(this.memory.buffer, this.used * BYTES_PER_SAMPLE, length);
    this.used += rounded;
    return view;
  }

  /** Byte address of `view[index]`, which must be one of this arena's views. */
  address(view: Float64Array, index: number): number {
    if (view.buffer !== this.memory.buffer) throw new RangeError('half-band kernel: array is not in the kernel arena');
    return view.byteOffset + index * BYTES_PER_SAMPLE;
  }

  interpolator(halfArm: number): InterpolateKernel {
    return this.exports[kernelName('interpolate', halfArm)] as InterpolateKernel;
  }

  decimator(halfArm: number): DecimateKernel {
    return this.exports[kernelName('decimate', halfArm)] as DecimateKernel;
  }
}
