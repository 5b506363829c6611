/**
 * Stationary loudness (ISO 532-1:2017, Zwicker's method) and sharpness
 * (DIN 45692:2009) of one signal: its 28 one-third-octave levels from the
 * filter bank of lib/acoustics/filter_bank.ts (fed chunk by chunk, memory
 * flat in the record's length), then the method of zwicker_core.ts.
 *
 * @module
 */
import { FilterBankMeter } from "../acoustics/filter_bank.ts";
import { coreLoudness, loudnessLevel, type SoundField, specificLoudness } from "./zwicker_core.ts";
import { sharpness } from "./sharpness.ts";
import { LOUDNESS_BANDS, raiseFactor, RateRaiser } from "./loudness_bands.ts";
import { BARK_COUNT } from "./zwicker_tables.ts";

/** The reference sound pressure, Pa (ISO 1683). */
export const P0 = 20e-6;

/** Loudness and sharpness of a sound. */
export interface LoudnessValues {
  /** Total loudness N, sone. */
  readonly loudness: number;
  /** Loudness level L_N, phon. */
  readonly loudnessLevel: number;
  /** Sharpness, acum (NaN for silence). */
  readonly sharpness: number;
  /** Specific loudness N′ at the middle of each 0.1-Bark step, sone/Bark (240 values). */
  readonly specific: Float64Array;
  /** Core loudness of the 20 critical bands, sone/Bark. */
  readonly core: Float64Array;
}

/**
 * Loudness, loudness level, specific loudness and sharpness from the 28
 * one-third-octave levels (25 Hz … 12.5 kHz, dB re 20 µPa).
 *
 * @throws {RangeError} for a level array that is not 28 long or holds NaN.
 *
 * @example
 * ```ts
 * import { loudnessOfLevels } from "./loudness_stationary.ts";
 * const levels = new Float64Array(28).fill(-Infinity);
 * levels[16] = 40; // 1 kHz, 40 dB: about 1 sone (ISO 532-1 definition)
 * const v = loudnessOfLevels(levels, "free");
 * if (Math.abs(v.loudness - 1) > 0.05) throw new Error();
 * ```
 */
export function loudnessOfLevels(levels: Float64Array, field: SoundField): LoudnessValues {
  const core = coreLoudness(levels, field);
  const specific = new Float64Array(BARK_COUNT);
  const loudness = specificLoudness(core, specific);
  return {
    loudness,
    loudnessLevel: loudnessLevel(loudness),
    sharpness: sharpness(specific),
    specific,
    core,
  };
}

/**
 * The 28 one-third-octave levels of a sound pressure signal fed chunk by
 * chunk, at any rate (raised by a power of two when the top band does not
 * fit, loudness_bands.ts).
 *
 * @example
 * ```ts
 * import { StationaryBandMeter } from "./loudness_stationary.ts";
 * // 1 kHz at 1 Pa r.m.s.: 93.98 dB in the 1 kHz band.
 * const x = new Float64Array(48000).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const m = new StationaryBandMeter(48000, x.length);
 * m.push(x);
 * if (Math.abs(m.finish().levels[16] - 93.98) > 0.05) throw new Error();
 * ```
 */
export class StationaryBandMeter {
  readonly #raiser: RateRaiser;
  readonly #bank: FilterBankMeter;

  /** @throws {RangeError} for a rate that is not positive. */
  constructor(rate: number, length: number) {
    const factor = raiseFactor(rate);
    this.#raiser = new RateRaiser(rate, factor);
    this.#bank = new FilterBankMeter(rate * factor, length * factor, LOUDNESS_BANDS);
  }

  /** Adds the next samples, Pa (changed in place: pass a copy to keep them). */
  push(chunk: Float64Array): void {
    this.#bank.push(this.#raiser.push(chunk));
  }

  /** The band levels, dB re 20 µPa, and the bands whose settling left less than half the record. */
  finish(): { levels: Float64Array; shortRecord: number[] } {
    const { power, shortRecord } = this.#bank.finish();
    const levels = power.map((p) => 10 * Math.log10(p / (P0 * P0)));
    return { levels, shortRecord: shortRecord.map((i) => LOUDNESS_BANDS[i].nominalHz) };
  }
}
