/**
 * Inputs to the nonlinear stages are limited to +-MAX_INPUT_VOLTS before anything else. No circuit
 * of this kind ever sees such a voltage (the supply is a few volts); the limit only guarantees that
 * every exponential, filter state and rail knee stays finite for any finite input.
 */
export const MAX_INPUT_VOLTS = 1e4;

export function limitInputVolts(volts: number): number {
  return volts > MAX_INPUT_VOLTS ? MAX_INPUT_VOLTS : volts < -MAX_INPUT_VOLTS ? -MAX_INPUT_VOLTS : volts;
}
