/**
 * The first stage of ISO 532-1:2017's time-varying method: each of the 28
 * one-third octaves filtered (the Butterworth band-passes of
 * lib/acoustics/filter_bank.ts), squared and smoothed by three first-order
 * low-passes in cascade, and read every 2 ms. The smoothing's time constant
 * is 2/(3·f_m) for a band of mid-band frequency f_m below 1 kHz and 2/3 ms
 * from 1 kHz up (from memory of the standard): long enough to take out the
 * ripple at 2·f_m, short enough to follow the sound.
 *
 * Bands low in frequency are filtered at a lower rate, as in the filter bank:
 * the signal is halved in rate (8th-order Butterworth low-pass at 0.2 of the
 * rate, then every other sample) while a band's upper edge stays below 0.05
 * of the rate. Every filter keeps its state between chunks, so any chunking
 * gives exactly the numbers of one pass.
 *
 * @module
 */
import { butterworthBandPass, butterworthLowPass } from "../acoustics/filter_bank.ts";
import { CascadeFilter } from "../acoustics/biquad.ts";
import { LOUDNESS_BANDS } from "./loudness_bands.ts";

/** The step of the time-varying method, s. */
export const STEP_S = 0.002;

/**
 * The smoothing time constant of a band of nominal mid-band frequency `hz`, s (from memory).
 *
 * @example
 * ```ts
 * import { smoothingTau } from "./loudness_envelope.ts";
 * if (Math.abs(smoothingTau(100) - 2 / 300) > 1e-15 || smoothingTau(4000) !== 2 / 3000) throw new Error();
 * ```
 */
export function smoothingTau(hz: number): number {
  return hz < 1000 ? 2 / (3 * hz) : 2 / 3000;
}

interface Level {
  readonly rate: number;
  index: number;
  readonly lowPass?: CascadeFilter;
  scratch: Float64Array;
  down: Float64Array;
}

interface BandState {
  readonly level: number;
  readonly filter: CascadeFilter;
  readonly a: number; // smoothing pole
  s1: number;
  s2: number;
  s3: number;
  next: number; // index (at its level) of the sample that closes the next step
  step: number; // steps closed so far
  readonly stepSamples: number; // samples of its level per step
  values: Float64Array; // mean squares of closed steps not yet taken
  count: number;
}

/**
 * Band mean squares every 2 ms of a signal fed in chunks, at a rate where
 * every band fits (below 0.45 of the rate: raise it first, loudness_bands.ts).
 *
 * @example
 * ```ts
 * import { BandEnvelopes } from "./loudness_envelope.ts";
 * // A 1 kHz sine of 1 r.m.s.: after settling, the 1 kHz band's mean square is 1.
 * const x = new Float64Array(48000).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const e = new BandEnvelopes(48000);
 * let last = NaN;
 * e.push(x, (ms) => { last = ms[16]; });
 * if (Math.abs(last - 1) > 0.02) throw new Error();
 * ```
 */
export class BandEnvelopes {
  readonly #levels: Level[] = [];
  readonly #bands: BandState[];
  readonly #step = new Float64Array(LOUDNESS_BANDS.length);

  /** @throws {RangeError} when the top band does not fit below 0.45 of `rate`. */
  constructor(rate: number) {
    const rates = [rate];
    this.#bands = LOUDNESS_BANDS.map((b) => {
      if (b.upperHz >= 0.45 * rate) {
        throw new RangeError(`band ${b.nominalHz} Hz does not fit below 0.45 of ${rate} Hz`);
      }
      let d = 0;
      // No lower than one sample per step.
      while (b.upperHz < 0.05 * rates[d] && (rates[d] / 2) * STEP_S >= 1) {
        if (rates[d + 1] === undefined) rates.push(rates[d] / 2);
        d++;
      }
      const r = rates[d];
      return {
        level: d,
        filter: new CascadeFilter(butterworthBandPass(b.lowerHz, b.upperHz, r)),
        a: Math.exp(-1 / (smoothingTau(b.nominalHz) * r)),
        s1: 0,
        s2: 0,
        s3: 0,
        stepSamples: STEP_S * r,
        next: Math.ceil(STEP_S * r - 1e-9) - 1,
        step: 0,
        values: new Float64Array(64),
        count: 0,
      };
    });
    rates.forEach((r, d) =>
      this.#levels.push({
        rate: r,
        index: 0,
        ...(d + 1 < rates.length
          ? { lowPass: new CascadeFilter(butterworthLowPass(0.2 * r, r)) }
          : {}),
        scratch: new Float64Array(0),
        down: new Float64Array(0),
      })
    );
  }

  /**
   * Adds the next samples (changed in place) and calls `onStep` with the 28
   * band mean squares of each 2-ms step closed by every band (the array is
   * reused: copy it to keep it).
   */
  push(chunk: Float64Array, onStep: (meanSquares: Float64Array) => void): void {
    this.#push(0, chunk);
    let ready = Infinity;
    for (const b of this.#bands) ready = Math.min(ready, b.count);
    for (let k = 0; k < ready; k++) {
      for (let i = 0; i < this.#bands.length; i++) this.#step[i] = this.#bands[i].values[k];
      onStep(this.#step);
    }
    for (const b of this.#bands) {
      b.values.copyWithin(0, ready, b.count);
      b.count -= ready;
    }
  }

  #push(d: number, chunk: Float64Array): void {
    const level = this.#levels[d];
    const start = level.index;
    for (const b of this.#bands) {
      if (b.level !== d) continue;
      if (level.scratch.length < chunk.length) level.scratch = new Float64Array(chunk.length);
      const y = level.scratch.subarray(0, chunk.length);
      y.set(chunk);
      b.filter.process(y);
      const a = b.a, c = 1 - a;
      let s1 = b.s1, s2 = b.s2, s3 = b.s3;
      for (let n = 0; n < y.length; n++) {
        s1 = a * s1 + c * y[n] * y[n];
        s2 = a * s2 + c * s1;
        s3 = a * s3 + c * s2;
        if (start + n === b.next) {
          if (b.count === b.values.length) {
            const grown = new Float64Array(2 * b.values.length);
            grown.set(b.values);
            b.values = grown;
          }
          b.values[b.count++] = s3;
          b.step++;
          b.next = Math.ceil((b.step + 1) * b.stepSamples - 1e-9) - 1;
        }
      }
      b.s1 = s1;
      b.s2 = s2;
      b.s3 = s3;
    }
    level.index += chunk.length;
    if (level.lowPass === undefined || chunk.length === 0) return;
    level.lowPass.process(chunk);
    const firstEven = start % 2 === 0 ? 0 : 1;
    const count = Math.max(0, Math.ceil((chunk.length - firstEven) / 2));
    if (level.down.length < count) level.down = new Float64Array(count);
    const next = level.down.subarray(0, count);
    for (let i = 0; i < count; i++) next[i] = chunk[firstEven + 2 * i];
    this.#push(d + 1, next);
  }
}
