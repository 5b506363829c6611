/**
 * The one-third octaves of ISO 532-1 (25 Hz … 12.5 kHz, IEC 61260-1 bands
 * −16 … 11 from lib/acoustics/bands.ts) and the rate they are filtered at.
 * The band filters need the top band's upper edge (14.03 kHz) below 0.45 of
 * the rate (lib/acoustics/filter_bank.ts), so a recording sampled below
 * 31.2 kHz is first raised by a power of two ({@linkcode RateRaiser}); what
 * lies above the recording's Nyquist frequency it never held, and the bands
 * that reach there are named ({@linkcode bandsBeyond}).
 *
 * @module
 */
import { type Band, band } from "../acoustics/bands.ts";
import { butterworthLowPass } from "../acoustics/filter_bank.ts";
import { CascadeFilter } from "../acoustics/biquad.ts";
import { BAND_COUNT, FIRST_BAND_INDEX } from "./zwicker_tables.ts";

/**
 * The method's 28 one-third octaves, 25 Hz … 12.5 kHz.
 *
 * @example
 * ```ts
 * import { LOUDNESS_BANDS } from "./loudness_bands.ts";
 * if (LOUDNESS_BANDS.length !== 28 || LOUDNESS_BANDS[16].nominalHz !== 1000) throw new Error();
 * ```
 */
export const LOUDNESS_BANDS: readonly Band[] = Array.from(
  { length: BAND_COUNT },
  (_, i) => band(FIRST_BAND_INDEX + i, 3),
);

const TOP_EDGE_HZ = LOUDNESS_BANDS[BAND_COUNT - 1].upperHz;

/**
 * The factor (1, 2, 4, …) by which a recording's rate is raised so that
 * every band fits below 0.45 of it.
 *
 * @throws {RangeError} for a rate that is not positive and finite.
 *
 * @example
 * ```ts
 * import { raiseFactor } from "./loudness_bands.ts";
 * if (raiseFactor(48000) !== 1 || raiseFactor(25600) !== 2 || raiseFactor(8000) !== 4) throw new Error();
 * ```
 */
export function raiseFactor(rate: number): number {
  if (!(rate > 0) || !Number.isFinite(rate)) {
    throw new RangeError(`the sample rate must be a positive number, got ${rate}`);
  }
  let factor = 1;
  while (TOP_EDGE_HZ >= 0.45 * rate * factor) factor *= 2;
  return factor;
}

/**
 * The nominal frequencies of the bands that reach above the recording's
 * Nyquist frequency: their levels hold only what lies below it.
 *
 * @example
 * ```ts
 * import { bandsBeyond } from "./loudness_bands.ts";
 * if (bandsBeyond(48000).length !== 0 || bandsBeyond(25600).join() !== "12500") throw new Error();
 * ```
 */
export function bandsBeyond(rate: number): number[] {
  return LOUDNESS_BANDS.filter((b) => b.upperHz > rate / 2).map((b) => b.nominalHz);
}

/**
 * Raises a signal's rate by an integer factor, chunk by chunk: zeros
 * between the samples, then a 16th-order Butterworth low-pass at the
 * original Nyquist frequency (gain = factor), which removes the images.
 * A factor of 1 passes the chunk through.
 *
 * @example
 * ```ts
 * import { RateRaiser } from "./loudness_bands.ts";
 * // A 1 kHz sine at 8 kHz raised to 16 kHz keeps its r.m.s.
 * const r = new RateRaiser(8000, 2);
 * const y = r.push(new Float64Array(8000).map((_, i) => Math.sin(2 * Math.PI * 1000 * i / 8000)));
 * let s = 0;
 * for (let i = 8000; i < 16000; i++) s += y[i] * y[i];
 * if (y.length !== 16000 || Math.abs(s / 8000 - 0.5) > 0.01) throw new Error();
 * ```
 */
export class RateRaiser {
  readonly #factor: number;
  readonly #filter: CascadeFilter | undefined;
  #out = new Float64Array(0);

  /** @throws {RangeError} for a factor that is not a positive integer. */
  constructor(rate: number, factor: number) {
    if (!Number.isInteger(factor) || factor < 1) {
      throw new RangeError(`the rate factor must be a positive integer, got ${factor}`);
    }
    this.#factor = factor;
    this.#filter = factor === 1
      ? undefined
      : new CascadeFilter(butterworthLowPass(rate / 2, rate * factor, 16));
  }

  /** The chunk at the raised rate (valid until the next push). */
  push(chunk: Float64Array): Float64Array {
    if (this.#filter === undefined) return chunk;
    const n = chunk.length * this.#factor;
    if (this.#out.length !== n) this.#out = new Float64Array(n);
    const out = this.#out;
    out.fill(0);
    for (let i = 0; i < chunk.length; i++) out[i * this.#factor] = chunk[i] * this.#factor;
    return this.#filter.process(out);
  }
}
