/**
 * Run one channel through a chain, block by block, and compensate the chain's latency so the output
 * has the input's length and timing: the input is followed by `latency` zeros and the first
 * `latency` output samples are dropped.
 */
import type { Chain } from './chain.js';

export interface RenderProgress {
  (doneSamples: number, totalSamples: number): void;
}

/** Progress is reported every this many blocks. */
const PROGRESS_BLOCKS = 256;

/**
 * Core loop: reads `source` x `inScale`, writes the chain's output x `outScale` into `target`.
 * `target` may be `source` itself (in place): every output index lies at or behind the samples
 * already read into the current block, so nothing is overwritten before it is read.
 */
export function renderInto(
  chain: Chain,
  source: Float32Array | Float64Array,
  target: Float32Array | Float64Array,
  inScale: number,
  outScale: number,
  onProgress?: RenderProgress,
): void {
  const total = source.length;
  const latency = chain.latencySamples;
  const block = new Float64Array(chain.blockSize);
  let read = 0; // input samples consumed (zeros beyond the end)
  let written = -latency; // output index of the next processed sample
  let blocksSinceProgress = 0;
  chain.reset();
  while (written < total) {
    const length = Math.min(chain.blockSize, total + latency - read);
    const view = length === block.length ? block : block.subarray(0, length);
    const available = Math.max(0, Math.min(length, total - read));
    for (let i = 0; i < available; i++) view[i] = source[read + i] * inScale;
    view.fill(0, available);
    chain.process(view);
    const skip = Math.max(0, -written);
    const keep = Math.min(length - skip, total - Math.max(written, 0));
    for (let i = skip; i < skip + keep; i++) target[written + i] = view[i] * outScale;
    read += length;
    written += length;
    if (onProgress && ++blocksSinceProgress >= PROGRESS_BLOCKS) {
      blocksSinceProgress = 0;
      onProgress(Math.min(Math.max(written, 0), total), total);
    }
  }
  onProgress?.(total, total);
}

/** Render a channel of volts into a new array of volts. */
export function renderChannel(chain: Chain, input: Float64Array, onProgress?: RenderProgress): Float64Array {
  const output = new Float64Array(input.length);
  renderInto(chain, input, output, 1, 1, onProgress);
  return output;
}
