/**
 * The values ISO 2631-1 takes from a frequency-weighted acceleration,
 * gathered chunk by chunk with memory flat in the record's length: the
 * r.m.s. a_w (6.1), the running r.m.s. with linear integration over
 * τ = 1 s and its maximum MTVV (6.3.1), the fourth-power vibration dose
 * value VDV (6.3.2), the crest factor (6.2.1), and the two ratios of
 * 6.3.3 with the limits above which the basic method underestimates.
 *
 * @module
 */

/** Crest factor above which the basic (r.m.s.) method may underestimate (ISO 2631-1 6.2.1). */
export const CREST_LIMIT = 9;
/** MTVV/a_w above which the basic method underestimates (ISO 2631-1 6.3.3). */
export const MTVV_RATIO_LIMIT = 1.5;
/** VDV/(a_w·T^¼) above which the basic method underestimates (ISO 2631-1 6.3.3). */
export const VDV_RATIO_LIMIT = 1.75;

/** What {@linkcode VibrationMeter.finish} gives. */
export interface VibrationValues {
  /** r.m.s. of the weighted signal, a_w. */
  readonly aw: number;
  /** Maximum of the running r.m.s. (τ = 1 s, linear), MTVV; NaN for a record shorter than τ. */
  readonly mtvv: number;
  /** (∫a_w⁴ dt)^¼, in the unit·s^¼. */
  readonly vdv: number;
  /** Peak |a_w| over a_w. */
  readonly crestFactor: number;
  /** MTVV / a_w. */
  readonly mtvvRatio: number;
  /** VDV / (a_w·T^¼). */
  readonly vdvRatio: number;
  /** The record's length T, s. */
  readonly duration: number;
  /** Which of ISO 2631-1's limits are passed: `crest>9`, `mtvv/aw>1.5`, `vdv/(aw·T^0.25)>1.75`. */
  readonly flags: readonly string[];
  /** The running r.m.s. every `historyStep` samples (from τ on), if asked for. */
  readonly history: Float64Array;
}

/** Options of {@linkcode VibrationMeter}. */
export interface VibrationMeterOptions {
  /** Integration time of the running r.m.s., s. Default 1 (ISO 2631-1 6.3.1). */
  readonly tau?: number;
  /** Samples between the running r.m.s. values kept for the history; 0 keeps none. Default 0. */
  readonly historyStep?: number;
}

/**
 * Gathers a weighted signal's values chunk by chunk.
 *
 * @example
 * ```ts
 * import { VibrationMeter } from "./vibration_metrics.ts";
 * // A 2 Hz sine of amplitude 1 for 4 s at 100 Hz, in two chunks.
 * const x = new Float64Array(400).map((_, i) => Math.sin(2 * Math.PI * 2 * i / 100));
 * const m = new VibrationMeter(100);
 * m.push(x.subarray(0, 150)); m.push(x.subarray(150));
 * const v = m.finish();
 * if (Math.abs(v.aw - Math.SQRT1_2) > 1e-12 || Math.abs(v.mtvv - v.aw) > 1e-12) throw new Error();
 * if (Math.abs(v.vdv - (3 * 4 / 8) ** 0.25) > 1e-12 || v.flags.length !== 0) throw new Error();
 * ```
 */
export class VibrationMeter {
  readonly #rate: number;
  readonly #window: Float64Array;
  readonly #historyStep: number;
  readonly #history: number[] = [];
  #count = 0;
  #sum2 = 0;
  #sum4 = 0;
  #peak = 0;
  #windowSum = 0;
  #maxWindow = -Infinity;

  constructor(rate: number, options: VibrationMeterOptions = {}) {
    const tau = options.tau ?? 1;
    const length = Math.round(tau * rate);
    if (!(length >= 1)) throw new RangeError(`τ = ${tau} s is shorter than one sample`);
    this.#rate = rate;
    this.#window = new Float64Array(length);
    this.#historyStep = options.historyStep ?? 0;
  }

  /** Takes the next samples of the weighted signal. */
  push(x: Float64Array): void {
    const window = this.#window, n = window.length;
    for (let i = 0; i < x.length; i++) {
      const v = x[i], v2 = v * v;
      this.#sum2 += v2;
      this.#sum4 += v2 * v2;
      const a = Math.abs(v);
      if (a > this.#peak) this.#peak = a;
      const slot = this.#count % n;
      this.#windowSum += v2 - window[slot];
      window[slot] = v2;
      this.#count++;
      if (slot === n - 1) {
        // Once per window the sum is taken afresh, so rounding cannot drift over hours.
        let s = 0;
        for (let j = 0; j < n; j++) s += window[j];
        this.#windowSum = s;
      }
      if (this.#count >= n) {
        const meanSquare = Math.max(this.#windowSum, 0) / n;
        if (meanSquare > this.#maxWindow) this.#maxWindow = meanSquare;
        if (this.#historyStep > 0 && (this.#count - n) % this.#historyStep === 0) {
          this.#history.push(Math.sqrt(meanSquare));
        }
      }
    }
  }

  /** The values of everything pushed so far. */
  finish(): VibrationValues {
    const duration = this.#count / this.#rate;
    const aw = Math.sqrt(this.#sum2 / this.#count);
    const mtvv = this.#count >= this.#window.length ? Math.sqrt(this.#maxWindow) : NaN;
    const vdv = (this.#sum4 / this.#rate) ** 0.25;
    const crestFactor = this.#peak / aw;
    const mtvvRatio = mtvv / aw;
    const vdvRatio = vdv / (aw * duration ** 0.25);
    const flags: string[] = [];
    if (crestFactor > CREST_LIMIT) flags.push(`crest>${CREST_LIMIT}`);
    if (mtvvRatio > MTVV_RATIO_LIMIT) flags.push(`mtvv/aw>${MTVV_RATIO_LIMIT}`);
    if (vdvRatio > VDV_RATIO_LIMIT) flags.push(`vdv/(aw·T^0.25)>${VDV_RATIO_LIMIT}`);
    return {
      aw,
      mtvv,
      vdv,
      crestFactor,
      mtvvRatio,
      vdvRatio,
      duration,
      flags,
      history: Float64Array.from(this.#history),
    };
  }
}
