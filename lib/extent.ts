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

/**
 * The median (the mean of the two middle values for an even count), by
 * selection (Hoare's quickselect with median-of-three pivots) on a copy:
 * O(n) on average instead of a sort's O(n log n). NaN for an empty array.
 *
 * @example
 * ```ts
 * import { medianOf } from "./extent.ts";
 * if (medianOf([5, 1, 4, 2, 3]) !== 3 || medianOf([4, 1, 3, 2]) !== 2.5) throw new Error();
 * ```
 */
export function medianOf(values: ArrayLike<number>): number {
  const n = values.length;
  if (n === 0) return NaN;
  const a = Float64Array.from(values);
  const upper = select(a, n >> 1);
  if (n % 2 === 1) return upper;
  // The lower middle is the largest value left of the upper one after selection.
  let lower = -Infinity;
  for (let i = 0; i < n >> 1; i++) if (a[i] > lower) lower = a[i];
  return (lower + upper) / 2;
}

/** Puts the k-th smallest value at a[k], smaller ones before it, and returns it. */
function select(a: Float64Array, k: number): number {
  let lo = 0, hi = a.length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    // Median of three as the pivot, so sorted or constant input stays linear.
    if (a[mid] < a[lo]) swap(a, mid, lo);
    if (a[hi] < a[lo]) swap(a, hi, lo);
    if (a[hi] < a[mid]) swap(a, hi, mid);
    const pivot = a[mid];
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        swap(a, i, j);
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else break;
  }
  return a[k];
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i];
  a[i] = a[j];
  a[j] = t;
}
