import { expect } from "vitest";

/** Asserts that two floating-point numbers differ by at most `tolerance` (absolute); the one float comparison of the suite. */
export function expectClose(actual: number, expected: number, tolerance = 1e-9, what = "value"): void {
  expect(Number.isFinite(actual), `${what}: ${actual} is not finite`).toBe(true);
  expect(Math.abs(actual - expected), `${what}: got ${actual}, expected ${expected} ± ${tolerance}`).toBeLessThanOrEqual(tolerance);
}
