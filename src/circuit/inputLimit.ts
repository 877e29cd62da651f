/**
 * Inputs to the nonlinear stages are limited to +-MAX_INPUT_VOLTS before anything else. No circuit
 * of this kind ever sees such a voltage (the supply is a few volts); the limit only guarantees that
 * every exponential, filter state and rail knee stays finite for any finite input.
 */
export const MAX_INPUT_VOLTS = 1e4;

export function limitInputVolts(volts: number): number {
  // The bounds are written as literals (= MAX_INPUT_VOLTS): read from the module binding they reach
  // V8's optimiser untyped, and it then boxed every result, one heap allocation per sample (measured).
  return volts > 1e4 ? 1e4 : volts < -1e4 ? -1e4 : volts;
}
