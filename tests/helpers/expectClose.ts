import { expect } from 'vitest';

/** |actual - expected| <= atol + rtol * |expected|, with a message that shows both values. */
export function expectClose(actual: number, expected: number, tol: { rtol?: number; atol?: number } = {}): void {
  const { rtol = 0, atol = 0 } = tol;
  const allowed = atol + rtol * Math.abs(expected);
  expect(Number.isFinite(actual), `actual ${actual} is not finite`).toBe(true);
  expect(Math.abs(actual - expected), `actual ${actual} vs expected ${expected} (allowed ${allowed})`).toBeLessThanOrEqual(allowed);
}
