/**
 * Time-varying loudness (ISO 532-1:2017, the method for time-varying
 * sounds) of one sound pressure signal fed chunk by chunk: the band mean
 * squares every 2 ms (loudness_envelope.ts), the core loudness of each step
 * (zwicker_core.ts), its nonlinear temporal decay, the upper slopes and the
 * total, the temporal weighting of the total, and N5 and N10 (exceeded 5 %
 * and 10 % of the time) from a fixed-size histogram. Memory is flat in the
 * record's length unless the history (N and sharpness every 2 ms) is kept.
 *
 * Nonlinear decay, per critical band (after the diode–capacitor model of
 * DIN 45631/A1, its time constants from memory: 5 ms, 15 ms, 75 ms; the
 * discretisation is ours): the output follows a rise at once; falling, it
 * decays towards a store with τ = 5 ms while the store decays with τ = 15 ms;
 * the store charges towards the output with τ = 75 ms. A long sound thus dies
 * away slowly (15 ms), a short burst quickly (5 ms).
 *
 * Temporal weighting of the total: 0.47 of a first-order low-pass with
 * τ = 3.5 ms plus 0.53 of one with τ = 70 ms (from memory).
 *
 * @module
 */
import { BandEnvelopes, STEP_S } from "./loudness_envelope.ts";
import { raiseFactor, RateRaiser } from "./loudness_bands.ts";
import { coreLoudness, loudnessLevel, type SoundField, specificLoudness } from "./zwicker_core.ts";
import { sharpness } from "./sharpness.ts";
import { LoudnessHistogram } from "./loudness_percentiles.ts";
import { P0 } from "./loudness_stationary.ts";
import { BAND_COUNT, BARK_COUNT, CRITICAL_BAND_COUNT } from "./zwicker_tables.ts";

const TAU_SHORT = 0.005, TAU_LONG = 0.015, TAU_CHARGE = 0.075;
const TAU_FAST = 0.0035, TAU_SLOW = 0.07, FAST_WEIGHT = 0.47;

/** Options of {@linkcode TimeVaryingLoudnessMeter}. */
export interface TimeVaryingOptions {
  /** Sound field. Default: "free". */
  readonly field?: SoundField;
  /** Keep N and sharpness of every 2-ms step (memory grows with the record). Default: false. */
  readonly history?: boolean;
}

/** The result of a time-varying loudness. */
export interface TimeVaryingValues {
  /** Mean of N(t), sone. */
  readonly loudness: number;
  /** Loudness level of the mean, phon. */
  readonly loudnessLevel: number;
  /** Loudness exceeded 5 % of the time, sone. */
  readonly n5: number;
  /** Loudness exceeded 10 % of the time, sone. */
  readonly n10: number;
  /** Largest N(t), sone. */
  readonly nMax: number;
  /** Sharpness of the time-averaged specific loudness, acum. */
  readonly sharpness: number;
  /** Time-averaged specific loudness, 240 steps of 0.1 Bark, sone/Bark. */
  readonly specific: Float64Array;
  /** Steps of 2 ms. */
  readonly steps: number;
  /** N(t) of every step, if kept. */
  readonly history?: Float64Array;
  /** Sharpness of every step, if kept (NaN in silence). */
  readonly sharpnessHistory?: Float64Array;
}

/**
 * The time-varying loudness of a sound pressure signal (Pa) at any rate.
 *
 * @example
 * ```ts
 * import { TimeVaryingLoudnessMeter } from "./loudness_time_varying.ts";
 * // 2 s of 1 kHz at 40 dB SPL: about 1 sone once settled.
 * const a = Math.SQRT2 * 20e-6 * 100;
 * const x = new Float64Array(96000).map((_, i) => a * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const m = new TimeVaryingLoudnessMeter(48000);
 * m.push(x);
 * const v = m.finish();
 * if (Math.abs(v.n5 - 1) > 0.06 || v.steps !== 1000) throw new Error();
 * ```
 */
export class TimeVaryingLoudnessMeter {
  readonly #field: SoundField;
  readonly #raiser: RateRaiser;
  readonly #envelopes: BandEnvelopes;
  readonly #levels = new Float64Array(BAND_COUNT);
  readonly #core = new Float64Array(CRITICAL_BAND_COUNT);
  readonly #out = new Float64Array(CRITICAL_BAND_COUNT);
  readonly #store = new Float64Array(CRITICAL_BAND_COUNT);
  readonly #specific = new Float64Array(BARK_COUNT);
  readonly #specificSum = new Float64Array(BARK_COUNT);
  readonly #histogram = new LoudnessHistogram();
  readonly #keep: boolean;
  #history = new Float64Array(0);
  #sharpness = new Float64Array(0);
  #steps = 0;
  #sum = 0;
  #max = 0;
  #fast = 0;
  #slow = 0;
  readonly #onStep = (ms: Float64Array) => this.#step(ms);

  /** @throws {RangeError} for a rate that is not positive. */
  constructor(rate: number, options: TimeVaryingOptions = {}) {
    this.#field = options.field ?? "free";
    this.#keep = options.history ?? false;
    const factor = raiseFactor(rate);
    this.#raiser = new RateRaiser(rate, factor);
    this.#envelopes = new BandEnvelopes(rate * factor);
  }

  /** Adds the next samples, Pa (changed in place: pass a copy to keep them). */
  push(chunk: Float64Array): void {
    this.#envelopes.push(this.#raiser.push(chunk), this.#onStep);
  }

  #step(meanSquares: Float64Array): void {
    for (let i = 0; i < BAND_COUNT; i++) {
      this.#levels[i] = 10 * Math.log10(meanSquares[i] / (P0 * P0));
    }
    const core = coreLoudness(this.#levels, this.#field, this.#core);
    decay(core, this.#out, this.#store);
    const total = specificLoudness(this.#out, this.#specific);
    for (let k = 0; k < BARK_COUNT; k++) this.#specificSum[k] += this.#specific[k];
    this.#fast += (total - this.#fast) * (1 - Math.exp(-STEP_S / TAU_FAST));
    this.#slow += (total - this.#slow) * (1 - Math.exp(-STEP_S / TAU_SLOW));
    const n = FAST_WEIGHT * this.#fast + (1 - FAST_WEIGHT) * this.#slow;
    this.#histogram.add(n);
    this.#sum += n;
    if (n > this.#max) this.#max = n;
    if (this.#keep) {
      if (this.#steps === this.#history.length) {
        this.#history = grow(this.#history);
        this.#sharpness = grow(this.#sharpness);
      }
      this.#history[this.#steps] = n;
      this.#sharpness[this.#steps] = sharpness(this.#specific);
    }
    this.#steps++;
  }

  /** The values of everything pushed. */
  finish(): TimeVaryingValues {
    const steps = this.#steps;
    const specific = this.#specificSum.map((v) => steps > 0 ? v / steps : NaN);
    const loudness = steps > 0 ? this.#sum / steps : NaN;
    return {
      loudness,
      loudnessLevel: Number.isFinite(loudness) ? loudnessLevel(loudness) : NaN,
      n5: this.#histogram.exceeded(0.05),
      n10: this.#histogram.exceeded(0.1),
      nMax: steps > 0 ? this.#max : NaN,
      sharpness: steps > 0 ? sharpness(specific) : NaN,
      specific,
      steps,
      ...(this.#keep
        ? {
          history: this.#history.slice(0, steps),
          sharpnessHistory: this.#sharpness.slice(0, steps),
        }
        : {}),
    };
  }
}

const grow = (a: Float64Array) => {
  const b = new Float64Array(Math.max(1024, 2 * a.length));
  b.set(a);
  return b;
};

const SHORT = Math.exp(-STEP_S / TAU_SHORT);
const LONG = Math.exp(-STEP_S / TAU_LONG);
const CHARGE = 1 - Math.exp(-STEP_S / TAU_CHARGE);

/**
 * One 2-ms step of the nonlinear decay of each band's core loudness:
 * `output` and `store` hold the state and are updated.
 *
 * @example
 * ```ts
 * import { decay } from "./loudness_time_varying.ts";
 * const out = new Float64Array(1), store = new Float64Array(1);
 * for (let i = 0; i < 500; i++) decay(new Float64Array([2]), out, store);
 * if (out[0] !== 2) throw new Error(); // a steady input passes unchanged
 * decay(new Float64Array([0]), out, store);
 * if (!(out[0] < 2 && out[0] > 1.5)) throw new Error(); // then dies away
 * ```
 */
export function decay(input: Float64Array, output: Float64Array, store: Float64Array): void {
  for (let i = 0; i < input.length; i++) {
    const x = input[i];
    let u1 = output[i], u2 = store[i];
    if (x >= u1) {
      u1 = x;
      u2 += (u1 - u2) * CHARGE;
    } else {
      u2 *= LONG;
      u1 = Math.max(x, u2 + (u1 - u2) * SHORT);
      if (u2 > u1) u2 = u1;
    }
    output[i] = u1;
    store[i] = u2;
  }
}
