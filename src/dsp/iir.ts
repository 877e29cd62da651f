import type { Processor } from '../circuit/processor.js';
import type { DigitalTransferFunction } from './bilinear.js';

/**
 * Direct form II transposed IIR filter (double precision), any order. Allocates its state once.
 * Used for the low-order sections the bilinear transform produces (order <= 3 here), where DF2T in
 * float64 is well conditioned.
 */
export function createIirFilter(tf: DigitalTransferFunction): Processor {
  const order = Math.max(tf.a.length, tf.b.length) - 1;
  const b = new Float64Array(order + 1);
  const a = new Float64Array(order + 1);
  b.set(tf.b);
  a.set(tf.a);
  const state = new Float64Array(order + 1);
  return {
    latencySamples: 0,
    reset(): void {
      state.fill(0);
    },
    process(block: Float64Array): void {
      const n = block.length;
      for (let i = 0; i < n; i++) {
        const x = block[i];
        const y = b[0] * x + state[0];
        for (let k = 1; k <= order; k++) state[k - 1] = b[k] * x - a[k] * y + state[k];
        block[i] = y;
      }
    },
  };
}
