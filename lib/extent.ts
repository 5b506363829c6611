/**
 * Smallest and largest values of data arrays, by a loop: `Math.min(...x)`
 * spreads the array onto the call stack and fails beyond about 10⁵ values
 * ("Maximum call stack size exceeded"), which a long record reaches.
 *
 * @module
 */

/**
 * The smallest value, NaN when any value is NaN, +∞ for an empty array.
 *
 * @example
 * ```ts
 * import { minOf } from "./extent.ts";
 * if (minOf(new Float64Array(1_000_000).map((_, i) => i - 3)) !== -3) throw new Error();
 * ```
 */
export function minOf(values: ArrayLike<number>): number {
  let m = Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v < m || Number.isNaN(v)) m = v;
    if (Number.isNaN(m)) return NaN;
  }
  return m;
}

/**
 * The largest value, NaN when any value is NaN, −∞ for an empty array.
 *
 * @example
 * ```ts
 * import { maxOf } from "./extent.ts";
 * if (maxOf([2, 7, -1]) !== 7 || !Number.isNaN(maxOf([1, NaN]))) throw new Error();
 * ```
 */
export function maxOf(values: ArrayLike<number>): number {
  let m = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v > m || Number.isNaN(v)) m = v;
    if (Number.isNaN(m)) return NaN;
  }
  return m;
}

/**
 * The index of the smallest value (the first, on ties), −1 for an empty array.
 *
 * @example
 * ```ts
 * import { indexOfMin } from "./extent.ts";
 * if (indexOfMin([3, 1, 1, 5]) !== 1) throw new Error();
 * ```
 */
export function indexOfMin(values: ArrayLike<number>): number {
  let best = -1;
  for (let i = 0; i < values.length; i++) if (best < 0 || values[i] < values[best]) best = i;
  return best;
}
