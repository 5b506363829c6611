/**
 * The one numeric comparison helper of the test suite.
 *
 * A value passes when |actual − expected| ≤ absolute + relative·|expected|.
 * Every call states both tolerances; `absolute` is what makes a line
 * "negligible" (e.g. 1e-10 of the largest expected value).
 */
import { expect } from "vitest";

/** Tolerances of {@linkcode assertClose}. */
export interface Tolerance {
  /** Allowed error relative to |expected|. */
  relative: number;
  /** Allowed absolute error, for values near zero. */
  absolute: number;
}

/** Asserts two numbers or two equal-length arrays agree within `tolerance`. */
export function assertClose(
  actual: number | ArrayLike<number>,
  expected: number | ArrayLike<number>,
  tolerance: Tolerance,
  label = "value",
): void {
  const a = typeof actual === "number" ? [actual] : Array.from(actual);
  const e = typeof expected === "number" ? [expected] : Array.from(expected);
  expect(a.length, `${label}: length`).toBe(e.length);
  for (let i = 0; i < e.length; i++) {
    const allowed = tolerance.absolute + tolerance.relative * Math.abs(e[i]);
    const error = Math.abs(a[i] - e[i]);
    if (!(error <= allowed)) {
      expect.fail(
        `${label}[${i}]: got ${a[i]}, expected ${e[i]} (error ${error} > allowed ${allowed})`,
      );
    }
  }
}

/** Largest absolute value of an array, for scaling absolute tolerances. */
export function maxAbs(values: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) m = Math.max(m, Math.abs(values[i]));
  return m;
}
