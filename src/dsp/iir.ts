import type { Processor } from './processor.js';
import type { DigitalTransferFunction } from './bilinear.js';

/** Highest order the unrolled kernel takes; every section the bilinear transform makes here fits. */
const UNROLLED_MAX_ORDER = 3;

/**
 * Direct form II transposed IIR filter (double precision), any order. Allocates its state once.
 * Used for the low-order sections the bilinear transform produces (order <= 3 here), where DF2T in
 * float64 is well conditioned. Orders up to 3 run an unrolled kernel with the state in locals
 * during the block (zero-padded coefficients); higher orders run the general loop.
 */
export function createIirFilter(tf: DigitalTransferFunction): Processor {
  const order = Math.max(tf.a.length, tf.b.length) - 1;
  const size = Math.max(order, UNROLLED_MAX_ORDER) + 1;
  const b = new Float64Array(size);
  const a = new Float64Array(size);
  b.set(tf.b);
  a.set(tf.a);
  return order <= UNROLLED_MAX_ORDER ? new UnrolledIir(b, a) : new GeneralIir(b, a, order);
}

/**
 * DF2T of order <= 3: y = b0 x + s0, s0 <- b1 x - a1 y + s1, s1 <- b2 x - a2 y + s2,
 * s2 <- b3 x - a3 y, with s0 substituted (u = b1 x_{n-1} + s1_{n-1}) so that the chain from one
 * output to the next is one multiply and one subtraction: y_n = (b0 x_n + u) - a1 y_{n-1}.
 */
class UnrolledIir implements Processor {
  readonly latencySamples = 0;
  private readonly state = new Float64Array(4); // u, s1, s2, y

  constructor(
    private readonly b: Float64Array,
    private readonly a: Float64Array,
  ) {}

  reset(): void {
    this.state.fill(0);
  }

  process(block: Float64Array): void {
    const { b, a, state } = this;
    const b0 = b[0];
    const b1 = b[1];
    const b2 = b[2];
    const b3 = b[3];
    const a1 = a[1];
    const a2 = a[2];
    const a3 = a[3];
    let u = state[0];
    let s1 = state[1];
    let s2 = state[2];
    let y = state[3];
    for (let i = 0; i < block.length; i++) {
      const x = block[i];
      y = b0 * x + u - a1 * y;
      u = b1 * x + s1;
      s1 = b2 * x + s2 - a2 * y;
      s2 = b3 * x - a3 * y;
      block[i] = y;
    }
    state[0] = u;
    state[1] = s1;
    state[2] = s2;
    state[3] = y;
  }
}

class GeneralIir implements Processor {
  readonly latencySamples = 0;
  private readonly state: Float64Array;

  constructor(
    private readonly b: Float64Array,
    private readonly a: Float64Array,
    private readonly order: number,
  ) {
    this.state = new Float64Array(order + 1);
  }

  reset(): void {
    this.state.fill(0);
  }

  process(block: Float64Array): void {
    const { b, a, state, order } = this;
    const n = block.length;
    for (let i = 0; i < n; i++) {
      const x = block[i];
      const y = b[0] * x + state[0];
      for (let k = 1; k <= order; k++) state[k - 1] = b[k] * x - a[k] * y + state[k];
      block[i] = y;
    }
  }
}
