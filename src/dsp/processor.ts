/**
 * The one contract every stage model meets. A processor is built once from its typed spec (all
 * validation and precomputation happen in the factory) and then processes blocks in place without
 * allocating. Signals are volts relative to the circuit's bias point.
 */
export interface Processor {
  /** Process a block in place. Must never write NaN or Inf for finite input. */
  process(block: Float64Array): void;
  /** Return to the quiescent state (all capacitors at the bias point). */
  reset(): void;
  /** Delay in samples that this processor adds (0 for causal IIR models). */
  readonly latencySamples: number;
}
