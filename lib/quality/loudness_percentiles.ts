/**
 * Percentiles of a loudness against time in fixed memory: a histogram on a
 * logarithmic scale, 20 000 bins per decade from 10⁻⁴ to 10⁴ sone (1.3 MB
 * however long the record), so a percentile is within 0.006 % of the value
 * a sort gives (or below 10⁻⁴ sone, read as 0).
 *
 * @module
 */

const PER_DECADE = 20000;
const LOW = -4;
const DECADES = 8;
const BINS = PER_DECADE * DECADES;

/**
 * A histogram of loudness values for their percentiles.
 *
 * @example
 * ```ts
 * import { LoudnessHistogram } from "./loudness_percentiles.ts";
 * const h = new LoudnessHistogram();
 * for (let i = 1; i <= 100; i++) h.add(i);
 * // Exceeded 5 % of the time: the 95th of 100 in ascending order.
 * if (Math.abs(h.exceeded(0.05) / 95 - 1) > 1e-4) throw new Error();
 * ```
 */
export class LoudnessHistogram {
  readonly #counts = new Uint32Array(BINS + 2); // [below, bins…, above]
  #count = 0;
  #max = 0;

  /** Adds one value, sone (≥ 0). */
  add(value: number): void {
    if (!(value >= 0)) throw new RangeError(`a loudness of ${value} sone`);
    const x = (Math.log10(value) - LOW) * PER_DECADE;
    const bin = x < 0 ? 0 : x >= BINS ? BINS + 1 : 1 + Math.floor(x);
    this.#counts[bin]++;
    this.#count++;
    if (value > this.#max) this.#max = value;
  }

  /** How many values were added. */
  get count(): number {
    return this.#count;
  }

  /**
   * The value exceeded by the fraction `p` (0 < p < 1) of the values: the
   * ⌈(1 − p)·n⌉-th smallest; NaN when empty.
   *
   * @throws {RangeError} for p outside (0, 1).
   */
  exceeded(p: number): number {
    if (!(p > 0 && p < 1)) throw new RangeError(`a fraction in (0, 1), got ${p}`);
    if (this.#count === 0) return NaN;
    const rank = Math.max(1, Math.ceil((1 - p) * this.#count - 1e-9));
    let seen = 0;
    for (let bin = 0; bin < this.#counts.length; bin++) {
      seen += this.#counts[bin];
      if (seen >= rank) {
        if (bin === 0) return 0;
        if (bin === BINS + 1) return this.#max;
        return 10 ** (LOW + (bin - 0.5) / PER_DECADE);
      }
    }
    return this.#max;
  }
}
