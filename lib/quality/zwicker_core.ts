/**
 * The steps of Zwicker's method (ISO 532-1:2017, stationary and per time
 * step of the time-varying method) from 28 one-third-octave levels: the
 * low-frequency weighting and grouping of the lowest bands, the outer ear's
 * transmission (free or diffuse field), the core loudness per critical band,
 * the upper slopes, the specific loudness N′(z) on 0.1-Bark steps and the
 * total loudness N. Tables: zwicker_tables.ts.
 *
 * @module
 */
import {
  BAND_COUNT,
  BAND_TOP_BARK,
  BANDWIDTH_DB,
  BARK_COUNT,
  BARK_STEP,
  CRITICAL_BAND_COUNT,
  DIFFUSE_DB,
  LOW_CORRECTION_DB,
  LOW_GROUPS,
  LOW_RANGE_DB,
  OUTER_EAR_DB,
  SLOPE_RANGE,
  THRESHOLD_DB,
  UPPER_SLOPE,
} from "./zwicker_tables.ts";

/** The sound field the method assumes: frontal free field or diffuse field. */
export type SoundField = "free" | "diffuse";

/** The sound fields, for options. */
export const SOUND_FIELDS: readonly SoundField[] = ["free", "diffuse"];

/**
 * Core loudness of the 20 critical bands, sone/Bark, from the levels of the
 * 28 one-third octaves 25 Hz … 12.5 kHz (dB re 20 µPa; −Infinity for a
 * silent band).
 *
 * @throws {RangeError} for a level array that is not 28 long, or a level
 * that is NaN or +Infinity.
 *
 * @example
 * ```ts
 * import { coreLoudness } from "./zwicker_core.ts";
 * const levels = new Float64Array(28).fill(-Infinity);
 * levels[16] = 40; // the 1 kHz one-third octave
 * const core = coreLoudness(levels, "free");
 * if (!(core[8] > 0.2 && core[8] < 0.5) || core[7] !== 0) throw new Error();
 * ```
 */
export function coreLoudness(
  levels: Float64Array,
  field: SoundField,
  out: Float64Array = new Float64Array(CRITICAL_BAND_COUNT),
): Float64Array {
  if (levels.length !== BAND_COUNT) {
    throw new RangeError(`Zwicker's method takes ${BAND_COUNT} band levels, got ${levels.length}`);
  }
  for (const l of levels) {
    if (Number.isNaN(l) || l === Infinity) throw new RangeError(`a band level of ${l} dB`);
  }
  // The eleven lowest bands: weighted by their level range, then summed in power into three groups.
  let band = 0;
  for (let g = 0; g < LOW_GROUPS.length; g++) {
    let power = 0;
    for (let k = 0; k < LOW_GROUPS[g]; k++, band++) {
      const l = levels[band];
      let range = 0;
      while (
        range < LOW_RANGE_DB.length - 1 && l > LOW_RANGE_DB[range] - LOW_CORRECTION_DB[range][band]
      ) {
        range++;
      }
      power += 10 ** ((l + LOW_CORRECTION_DB[range][band]) / 10);
    }
    out[g] = power > 0 ? 10 * Math.log10(power) : -Infinity;
  }
  for (let i = LOW_GROUPS.length; i < CRITICAL_BAND_COUNT; i++) out[i] = levels[i + 8];
  for (let i = 0; i < CRITICAL_BAND_COUNT; i++) {
    let excitation = out[i] - OUTER_EAR_DB[i];
    if (field === "diffuse") excitation += DIFFUSE_DB[i];
    const threshold = THRESHOLD_DB[i];
    let n = 0;
    if (excitation > threshold) {
      excitation -= BANDWIDTH_DB[i];
      // Zwicker's loudness function with exponent 0.25 and s = 0.25.
      n = 0.0635 * 10 ** (0.025 * threshold) *
        ((0.75 + 0.25 * 10 ** ((excitation - threshold) / 10)) ** 0.25 - 1);
      if (!(n > 0)) n = 0;
    }
    out[i] = n;
  }
  // The threshold varies inside the lowest critical band: its core loudness is reduced.
  out[0] *= Math.min(1, 0.4 + 0.32 * out[0] ** 0.2);
  return out;
}

/**
 * The specific loudness N′(z) from the core loudness: each band's core
 * value across its critical band, and where the next band's core is lower,
 * the upper slope of the band before (its steepness from the table of
 * slopes by specific loudness). Writes N′ at the middle of each 0.1-Bark
 * step into `specific` (240 values, 0 … 24 Bark) when given, and returns the
 * total loudness N, sone: the exact area under the piecewise-linear N′(z).
 *
 * @example
 * ```ts
 * import { specificLoudness } from "./zwicker_core.ts";
 * const core = new Float64Array(20);
 * core[8] = 1; // 1 sone/Bark from 7.9 to 9.2 Bark, then the upper slope
 * const specific = new Float64Array(240);
 * const total = specificLoudness(core, specific);
 * if (!(total > 1.3) || Math.abs(specific[85] - 1) > 1e-12 || specific[50] !== 0) throw new Error();
 * ```
 */
export function specificLoudness(core: Float64Array, specific?: Float64Array): number {
  if (specific !== undefined) specific.fill(0);
  let total = 0;
  let n1 = 0, z1 = 0, range = 0;
  const last = SLOPE_RANGE.length - 1;
  for (let i = 0; i <= CRITICAL_BAND_COUNT; i++) {
    const top = BAND_TOP_BARK[i] + 1e-4;
    // A slope in band i's range falls from the band below: its steepness is that band's
    // column (ISO 532-1:2017, from memory; band 0 has no band below and never starts a slope).
    const column = Math.max(0, Math.min(i - 1, UPPER_SLOPE[0].length - 1));
    const value = i < CRITICAL_BAND_COUNT ? core[i] : 0;
    while (z1 < top) {
      let n2: number, z2: number, slope = 0;
      if (n1 <= value) {
        if (n1 < value) {
          range = 0;
          while (range < last && SLOPE_RANGE[range] > value) range++;
        }
        z2 = top;
        n2 = value;
      } else {
        while (range < last && n1 <= SLOPE_RANGE[range]) range++;
        // The floor of this range, or 0 below the last range's floor.
        const floor = n1 > SLOPE_RANGE[range] ? SLOPE_RANGE[range] : 0;
        n2 = Math.max(floor, value);
        slope = UPPER_SLOPE[range][column];
        z2 = z1 + (n1 - n2) / slope;
        if (z2 > top) {
          z2 = top;
          n2 = n1 - (z2 - z1) * slope;
        }
      }
      total += (z2 - z1) * (n1 === n2 || slope === 0 ? n2 : (n1 + n2) / 2);
      if (specific !== undefined) fillSegment(specific, z1, z2, slope === 0 ? n2 : n1, slope);
      if (n2 <= SLOPE_RANGE[range] && range < last) range++;
      n1 = n2;
      z1 = z2;
    }
  }
  return total;
}

/** N′ at the step midpoints in [z1, z2): start value n1 falling by `slope` per Bark. */
function fillSegment(
  specific: Float64Array,
  z1: number,
  z2: number,
  n1: number,
  slope: number,
): void {
  const first = Math.max(0, Math.ceil(z1 / BARK_STEP - 0.5));
  const end = Math.min(BARK_COUNT, Math.ceil(z2 / BARK_STEP - 0.5));
  for (let k = first; k < end; k++) {
    const z = (k + 0.5) * BARK_STEP;
    specific[k] = Math.max(0, n1 - (z - z1) * slope);
  }
}

/**
 * Loudness level L_N, phon, of a total loudness N, sone: 40 + 10·log₂ N at
 * and above 1 sone (40 phon is 1 sone, and 10 phon more doubles the
 * loudness), and the method's low-level relation 40·(N + 0.0005)^0.35 below
 * (ISO 532-1:2017, from memory), which meets it near 1 sone.
 *
 * @throws {RangeError} for a negative or non-finite loudness.
 *
 * @example
 * ```ts
 * import { loudnessLevel } from "./zwicker_core.ts";
 * if (loudnessLevel(1) !== 40 || Math.abs(loudnessLevel(4) - 60) > 1e-12) throw new Error();
 * ```
 */
export function loudnessLevel(sone: number): number {
  if (!(sone >= 0) || !Number.isFinite(sone)) {
    throw new RangeError(`loudness must be a finite number ≥ 0 sone, got ${sone}`);
  }
  return sone >= 1 ? 40 + 10 * Math.log2(sone) : 40 * (sone + 0.0005) ** 0.35;
}
