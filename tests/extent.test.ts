import { describe, expect, test } from "vitest";
import { maxOf, medianOf, minOf } from "../lib/extent.ts";
import { gaussianNoise, uniformGenerator } from "./helpers/random.ts";

describe("extremes and the median of long arrays", () => {
  test("min and max of 10^6 values (where a spread overflows the stack)", () => {
    const x = new Float64Array(1_000_000).map((_, i) => Math.sin(i));
    let lo = Infinity, hi = -Infinity;
    for (const v of x) {
      lo = v < lo ? v : lo;
      hi = v > hi ? v : hi;
    }
    expect(minOf(x)).toBe(lo);
    expect(maxOf(x)).toBe(hi);
  });

  test("the median by selection equals the median of the sorted values (definition)", () => {
    const uniform = uniformGenerator(5);
    for (let trial = 0; trial < 200; trial++) {
      const n = 1 + Math.floor(uniform() * 500);
      // Random values with many repeats, sorted runs and constants among the trials.
      const x = trial % 3 === 0
        ? gaussianNoise(trial, n)
        : trial % 3 === 1
        ? new Float64Array(n).map(() => Math.floor(uniform() * 5))
        : new Float64Array(n).map((_, i) => i % 7);
      const sorted = x.slice().sort();
      const expected = n % 2 === 1 ? sorted[n >> 1] : (sorted[(n >> 1) - 1] + sorted[n >> 1]) / 2;
      expect(medianOf(x)).toBe(expected);
    }
  });
});
