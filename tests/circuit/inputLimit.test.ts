import { describe, expect, it } from 'vitest';
import { limitInputVolts, MAX_INPUT_VOLTS } from '../../src/circuit/inputLimit.js';

describe('input limit', () => {
  it('clamps to +-MAX_INPUT_VOLTS and passes everything inside unchanged', () => {
    expect(limitInputVolts(1e9)).toBe(MAX_INPUT_VOLTS);
    expect(limitInputVolts(-1e9)).toBe(-MAX_INPUT_VOLTS);
    expect(limitInputVolts(Number.MAX_VALUE)).toBe(MAX_INPUT_VOLTS);
    for (const volts of [0, 0.5, -4.5, MAX_INPUT_VOLTS, -MAX_INPUT_VOLTS, 9999.999]) expect(limitInputVolts(volts)).toBe(volts);
  });
});
