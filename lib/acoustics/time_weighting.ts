/**
 * Exponential time weighting and level statistics, IEC 61672-1:2013:
 * Fast τ = 0.125 s, Slow τ = 1 s. The running mean square follows
 * dy/dt = (x² − y)/τ, discretised exactly for a sampled step:
 * y[n] = y[n−1] + (1 − e^(−1/(τ·fs)))·(x²[n] − y[n−1]).
 *
 * The average starts from rest (y = 0 before the first sample), as IEC
 * 61672-1's exponential averaging does: a sound at the record's start reads
 * as one that began there. A 20 ms burst at the start thus reads
 * 10·lg(1 − e^(−0.02/0.125)) = −8.3 dB below its steady level with Fast,
 * like the same burst anywhere else in the record.
 *
 * The rise from rest is no reading of the sound, so the lowest level and the
 * exceedance levels count only once the meter has settled: after
 * {@linkcode SETTLING_TIME_CONSTANTS} time constants (a steady sound then
 * reads within 0.03 dB, 10·lg(1 − e^(−5))). The highest level counts from
 * the first sample: starting from rest can only read low, never invent a
 * maximum.
 *
 * @module
 */
import { parseChoice } from "../choices.ts";

/**
 * The time weightings.
 *
 * @example
 * ```ts
 * import { TIME_WEIGHTINGS } from "./time_weighting.ts";
 * if (TIME_WEIGHTINGS.join() !== "fast,slow,none") throw new Error();
 * ```
 */
export const TIME_WEIGHTINGS = ["fast", "slow", "none"] as const;

/** One of {@linkcode TIME_WEIGHTINGS}; `none` gives Leq over each step. */
export type TimeWeighting = typeof TIME_WEIGHTINGS[number];

/** Time constants, s (IEC 61672-1:2013, 3.9 and 5.8). */
export const TIME_CONSTANTS_S: Readonly<Record<"fast" | "slow", number>> = { fast: 0.125, slow: 1 };

/**
 * Time constants after the start before the lowest level and the readings'
 * statistics count (common practice: 5τ, within 0.03 dB of a steady level).
 *
 * @example
 * ```ts
 * import { SETTLING_TIME_CONSTANTS } from "./time_weighting.ts";
 * if (10 * Math.log10(1 - Math.exp(-SETTLING_TIME_CONSTANTS)) < -0.03) throw new Error();
 * ```
 */
export const SETTLING_TIME_CONSTANTS = 5;

/**
 * Seconds from the start before a meter of this weighting has settled
 * (0 for `none`).
 *
 * @example
 * ```ts
 * import { settlingSeconds } from "./time_weighting.ts";
 * if (settlingSeconds("fast") !== 0.625 || settlingSeconds("none") !== 0) throw new Error();
 * ```
 */
export function settlingSeconds(weighting: TimeWeighting): number {
  return weighting === "none" ? 0 : SETTLING_TIME_CONSTANTS * TIME_CONSTANTS_S[weighting];
}

/**
 * Narrows a user-supplied string to a {@linkcode TimeWeighting}.
 *
 * @example
 * ```ts
 * import { parseTimeWeighting } from "./time_weighting.ts";
 * if (parseTimeWeighting("slow") !== "slow") throw new Error();
 * ```
 */
export function parseTimeWeighting(name: string): TimeWeighting {
  return parseChoice(name, TIME_WEIGHTINGS, "time weighting");
}

/**
 * The time-weighted mean square of a signal fed in chunks, read at the end
 * of every `step` samples (for `none`: the mean square over each step), and
 * the mean square of the whole signal for Leq. Fast and Slow start from
 * rest. Feeding the whole signal at once or in chunks gives the same
 * readings.
 *
 * @example
 * ```ts
 * import { TimeWeightedMeter } from "./time_weighting.ts";
 * // Leq per step ("none"): a constant 2 has mean square 4 in every step.
 * const m = new TimeWeightedMeter(100, "none", 50);
 * m.push(new Float64Array(100).fill(2));
 * const r = m.finish();
 * if (r.readings.length !== 2 || r.readings[1] !== 4 || r.meanSquare !== 4) throw new Error();
 * // Fast from rest: one sample of 1 at 8 Hz reads 1 − e^(−1) (τ = 0.125 s).
 * const f = new TimeWeightedMeter(8, "fast", 1);
 * f.push(new Float64Array([1]));
 * if (Math.abs(f.finish().highest - (1 - Math.exp(-1))) > 1e-12) throw new Error();
 * ```
 */
export class TimeWeightedMeter {
  readonly #weighting: TimeWeighting;
  readonly #step: number;
  readonly #alpha: number;
  /** Samples before the meter has settled (see {@linkcode SETTLING_TIME_CONSTANTS}). */
  readonly #settle: number;
  #y = 0;
  #n = 0;
  #stepSum = 0;
  #total = 0;
  #highest = -Infinity;
  #lowest = Infinity;
  readonly #readings: number[] = [];

  /**
   * @throws {RangeError} for a step below one sample.
   */
  constructor(rate: number, weighting: TimeWeighting, step: number) {
    if (!Number.isInteger(step) || step < 1) {
      throw new RangeError(`step must be at least one sample, got ${step}`);
    }
    this.#weighting = weighting;
    this.#step = step;
    this.#alpha = weighting === "none"
      ? 0
      : 1 - Math.exp(-1 / (TIME_CONSTANTS_S[weighting] * rate));
    this.#settle = Math.ceil(settlingSeconds(weighting) * rate);
  }

  /** Adds the next samples. */
  push(x: Float64Array): void {
    for (let i = 0; i < x.length; i++) this.#total += x[i] * x[i];
    if (this.#weighting === "none") {
      for (let i = 0; i < x.length; i++) {
        this.#stepSum += x[i] * x[i];
        if (++this.#n % this.#step === 0) {
          const reading = this.#stepSum / this.#step;
          this.#readings.push(reading);
          if (reading > this.#highest) this.#highest = reading;
          if (reading < this.#lowest) this.#lowest = reading;
          this.#stepSum = 0;
        }
      }
      return;
    }
    // The extremes are tracked at every sample, not at the readings: IEC 61672-1
    // defines Lmax as the maximum of the continuously time-weighted level.
    let y = this.#y;
    let highest = this.#highest, lowest = this.#lowest;
    const settle = this.#settle;
    for (let i = 0; i < x.length; i++) {
      y += this.#alpha * (x[i] * x[i] - y);
      if (y > highest) highest = y;
      const n = ++this.#n;
      if (n > settle && y < lowest) lowest = y;
      if (n % this.#step === 0) this.#readings.push(y);
    }
    this.#y = y;
    this.#highest = highest;
    this.#lowest = lowest;
  }

  /**
   * The readings, the mean square of everything pushed, the highest
   * time-weighted mean square (for Fast and Slow at every sample; for `none`
   * over the step readings), and the lowest once settled; `settledFrom` is
   * the first reading taken after the meter settled (the readings' length
   * when the record is shorter than the settling time, and `lowest` then
   * Infinity).
   */
  finish(): {
    readings: Float64Array;
    meanSquare: number;
    samples: number;
    highest: number;
    lowest: number;
    settledFrom: number;
  } {
    const samples = this.#n;
    // Reading j is taken at sample (j + 1)·step; it counts once that exceeds the settling samples.
    const settledFrom = Math.min(
      this.#readings.length,
      Math.max(0, Math.floor(this.#settle / this.#step)),
    );
    return {
      readings: new Float64Array(this.#readings),
      meanSquare: this.#total / samples,
      samples,
      highest: this.#highest,
      lowest: this.#lowest,
      settledFrom,
    };
  }
}

/**
 * The time-weighted mean square of `x`, sampled at the end of every `step`
 * samples (for `none`: the mean square over each step).
 *
 * @throws {RangeError} for a step below one sample.
 *
 * @example
 * ```ts
 * import { timeWeightedMeanSquare } from "./time_weighting.ts";
 * const x = new Float64Array(8000).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 100 * i / 8000));
 * const y = timeWeightedMeanSquare(x, 8000, "none", 800);
 * if (Math.abs(y[3] - 1) > 1e-9) throw new Error();
 * ```
 */
export function timeWeightedMeanSquare(
  x: Float64Array,
  rate: number,
  weighting: TimeWeighting,
  step: number,
): Float64Array {
  const meter = new TimeWeightedMeter(rate, weighting, step);
  meter.push(x);
  return meter.finish().readings;
}

/** Summary statistics of a level history. */
export interface LevelStatistics {
  /** Equivalent continuous level over the whole record, dB. */
  readonly leq: number;
  /** Highest time-weighted level, dB. */
  readonly lmax: number;
  /** Lowest time-weighted level, dB. */
  readonly lmin: number;
  /** Level exceeded 10 % of the time, dB. */
  readonly l10: number;
  /** Level exceeded 50 % of the time, dB. */
  readonly l50: number;
  /** Level exceeded 90 % of the time, dB. */
  readonly l90: number;
}

/**
 * Leq from the whole record's mean square, the exceedance levels from the
 * sampled levels (L_N is the level exceeded N % of the time: the (100 − N)th
 * percentile, linearly interpolated; common practice), and Lmax and Lmin from
 * `extremes` (the continuously tracked levels, see
 * {@linkcode TimeWeightedMeter.finish}) or, without it, from the sampled levels.
 *
 * @example
 * ```ts
 * import { levelStatistics } from "./time_weighting.ts";
 * const s = levelStatistics(1, new Float64Array([60, 70, 80, 90, 100]));
 * if (s.l50 !== 80 || s.l10 !== 96 || s.lmax !== 100) throw new Error();
 * const t = levelStatistics(1, new Float64Array([60, 70]), { lmax: 72.5, lmin: 59 });
 * if (t.lmax !== 72.5 || t.lmin !== 59) throw new Error();
 * ```
 */
export function levelStatistics(
  leqDb: number,
  levels: Float64Array,
  extremes?: { lmax: number; lmin: number },
): LevelStatistics {
  const sorted = levels.slice().sort();
  const percentile = (p: number) => {
    const at = (p / 100) * (sorted.length - 1);
    const lo = Math.floor(at);
    const hi = Math.min(sorted.length - 1, lo + 1);
    // Equal neighbours (−∞ of a dead channel among them) need no interpolation: ∞ − ∞ is NaN.
    if (sorted[hi] === sorted[lo]) return sorted[lo];
    return sorted[lo] + (at - lo) * (sorted[hi] - sorted[lo]);
  };
  return {
    leq: leqDb,
    lmax: extremes?.lmax ?? sorted[sorted.length - 1],
    lmin: extremes?.lmin ?? sorted[0],
    l10: percentile(90),
    l50: percentile(50),
    l90: percentile(10),
  };
}
