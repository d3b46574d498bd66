// Shared tolerances and closeness checks for the tests. Tolerances are stated in units
// of double-precision machine epsilon where rounding sets them (the habit of stdlib-js),
// and as plain numbers where a method error does (finite differences, fits).
import { expect } from 'vitest';

/** Double-precision machine epsilon, 2^-52. */
export const EPS = Number.EPSILON;

/** n units of machine epsilon. */
export function ulps(n: number): number {
  return n * EPS;
}

/** |actual - expected| / |expected| (the absolute difference where expected is 0). */
export function relativeError(actual: number, expected: number): number {
  const diff = Math.abs(actual - expected);
  return expected === 0 ? diff : diff / Math.abs(expected);
}

/** Largest component difference over the largest expected component (a normwise relative error). */
export function normwiseRelativeError(actual: ArrayLike<number>, expected: ArrayLike<number>): number {
  expect(actual.length, 'lengths of the compared arrays').toBe(expected.length);
  let diff = 0;
  let scale = 0;
  for (let k = 0; k < expected.length; k++) {
    diff = Math.max(diff, Math.abs(actual[k] - expected[k]));
    scale = Math.max(scale, Math.abs(expected[k]));
  }
  return scale === 0 ? diff : diff / scale;
}

/** Expect |actual - expected| <= abs + rel |expected|, naming the quantity on failure. */
export function expectClose(actual: number, expected: number, tolerance: { abs?: number; rel?: number }, what = 'value'): void {
  const bound = (tolerance.abs ?? 0) + (tolerance.rel ?? 0) * Math.abs(expected);
  const diff = Math.abs(actual - expected);
  expect(Number.isFinite(actual), `${what} is finite (got ${actual})`).toBe(true);
  expect(diff <= bound, `${what}: ${actual} vs ${expected}, |difference| ${diff.toExponential(3)} > ${bound.toExponential(3)}`).toBe(true);
}
