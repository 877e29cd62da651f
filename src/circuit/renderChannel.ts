/**
 * Run one channel (volts) through a chain, block by block, and compensate the chain's latency so
 * the output has the input's length and timing: the input is followed by `latency` zeros and the
 * first `latency` output samples are dropped.
 */
import type { Chain } from './chain.js';

export interface RenderProgress {
  (doneSamples: number, totalSamples: number): void;
}

export function renderChannel(chain: Chain, input: Float64Array, onProgress?: RenderProgress): Float64Array {
  const total = input.length;
  const latency = chain.latencySamples;
  const output = new Float64Array(total);
  const block = new Float64Array(chain.blockSize);
  let read = 0; // input samples consumed (zeros beyond the end)
  let written = -latency; // output index of the next processed sample
  let blocksSinceProgress = 0;
  chain.reset();
  while (written < total) {
    const length = Math.min(chain.blockSize, total + latency - read);
    const view = length === block.length ? block : block.subarray(0, length);
    const available = Math.max(0, Math.min(length, total - read));
    view.set(input.subarray(read, read + available));
    view.fill(0, available);
    chain.process(view);
    const skip = Math.max(0, -written);
    const keep = Math.min(length - skip, total - Math.max(written, 0));
    if (keep > 0) output.set(view.subarray(skip, skip + keep), written + skip);
    read += length;
    written += length;
    if (onProgress && ++blocksSinceProgress >= 256) {
      blocksSinceProgress = 0;
      onProgress(Math.min(Math.max(written, 0), total), total);
    }
  }
  onProgress?.(total, total);
  return output;
}
