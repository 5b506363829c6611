/**
 * Exponential time weighting and level statistics, IEC 61672-1:2013:
 * Fast τ = 0.125 s, Slow τ = 1 s. The running mean square follows
 * dy/dt = (x² − y)/τ, discretised exactly for a sampled step:
 * y[n] = y[n−1] + (1 − e^(−1/(τ·fs)))·(x²[n] − y[n−1]).
 *
 * The average starts from the mean square of the first τ seconds rather than
 * from zero, so the first readings are not an artefact of switching on.
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
 * the mean square of the whole signal for Leq. Feeding the whole signal at
 * once or in chunks gives the same readings.
 *
 * @example
 * ```ts
 * import { TimeWeightedMeter } from "./time_weighting.ts";
 * // Leq per step ("none"): a constant 2 has mean square 4 in every step.
 * const m = new TimeWeightedMeter(100, "none", 50);
 * m.push(new Float64Array(100).fill(2));
 * const r = m.finish();
 * if (r.readings.length !== 2 || r.readings[1] !== 4 || r.meanSquare !== 4) throw new Error();
 * ```
 */
export class TimeWeightedMeter {
  readonly #weighting: TimeWeighting;
  readonly #step: number;
  readonly #alpha: number;
  readonly #warm: Float64Array;
  #warmFilled = 0;
  #started = false;
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
    const tau = weighting === "none" ? 0 : TIME_CONSTANTS_S[weighting];
    this.#alpha = weighting === "none" ? 0 : 1 - Math.exp(-1 / (tau * rate));
    this.#warm = new Float64Array(weighting === "none" ? 0 : Math.max(1, Math.round(tau * rate)));
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
    let i = 0;
    if (!this.#started) {
      const take = Math.min(x.length, this.#warm.length - this.#warmFilled);
      this.#warm.set(x.subarray(0, take), this.#warmFilled);
      this.#warmFilled += take;
      i = take;
      if (this.#warmFilled < this.#warm.length) return;
      this.#start(this.#warm);
    }
    this.#run(x.subarray(i));
  }

  #start(first: Float64Array): void {
    this.#started = true;
    let y = 0;
    for (let n = 0; n < first.length; n++) y += (first[n] * first[n]) / first.length;
    this.#y = y;
    this.#run(first);
  }

  #run(x: Float64Array): void {
    // The extremes are tracked at every sample, not at the readings: IEC 61672-1
    // defines Lmax as the maximum of the continuously time-weighted level.
    let y = this.#y;
    let highest = this.#highest, lowest = this.#lowest;
    for (let i = 0; i < x.length; i++) {
      y += this.#alpha * (x[i] * x[i] - y);
      if (y > highest) highest = y;
      if (y < lowest) lowest = y;
      if (++this.#n % this.#step === 0) this.#readings.push(y);
    }
    this.#y = y;
    this.#highest = highest;
    this.#lowest = lowest;
  }

  /**
   * The readings, the mean square of everything pushed, and the highest and
   * lowest time-weighted mean square (for Fast and Slow at every sample; for
   * `none` over the step readings).
   */
  finish(): {
    readings: Float64Array;
    meanSquare: number;
    samples: number;
    highest: number;
    lowest: number;
  } {
    // A record shorter than the warm-up window warms up on what there is.
    if (this.#weighting !== "none" && !this.#started && this.#warmFilled > 0) {
      this.#start(this.#warm.subarray(0, this.#warmFilled));
    }
    const samples = this.#n;
    return {
      readings: new Float64Array(this.#readings),
      meanSquare: this.#total / samples,
      samples,
      highest: this.#highest,
      lowest: this.#lowest,
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
