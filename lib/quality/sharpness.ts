/**
 * Sharpness by DIN 45692:2009 from the specific loudness N′(z): the first
 * moment of N′ along the critical-band rate, weighted by g(z) towards high
 * z, over the total loudness:
 * S = k·∫ N′(z)·g(z)·z dz / ∫ N′(z) dz, acum, with g(z) = 1 up to 15.8 Bark
 * and 0.15·e^(0.42·(z − 15.8)) + 0.85 above, and k = 0.11 (the standard's
 * constant, from memory, fixed so that a noise one critical band wide at
 * 1 kHz and 60 dB is 1 acum).
 *
 * @module
 */
import { BARK_COUNT, BARK_STEP } from "./zwicker_tables.ts";

/** DIN 45692's constant k, acum/Bark (from memory). */
export const SHARPNESS_K = 0.11;

/**
 * DIN 45692's weighting g(z) of the critical-band rate z, Bark.
 *
 * @example
 * ```ts
 * import { sharpnessWeighting } from "./sharpness.ts";
 * if (sharpnessWeighting(10) !== 1 || Math.abs(sharpnessWeighting(15.8) - 1) > 1e-12) throw new Error();
 * ```
 */
export function sharpnessWeighting(z: number): number {
  return z <= 15.8 ? 1 : 0.15 * Math.exp(0.42 * (z - 15.8)) + 0.85;
}

const WEIGHTS = Float64Array.from(
  { length: BARK_COUNT },
  (_, k) => sharpnessWeighting((k + 0.5) * BARK_STEP) * (k + 0.5) * BARK_STEP,
);

/**
 * Sharpness, acum, of a specific loudness on 240 steps of 0.1 Bark (N′ at
 * each step's middle, as `specificLoudness` writes it); NaN for silence
 * (no loudness, no sharpness).
 *
 * @throws {RangeError} for an array that is not 240 long.
 *
 * @example
 * ```ts
 * import { sharpness } from "./sharpness.ts";
 * // All loudness at 9.05 Bark (g = 1): S = 0.11 · 9.05.
 * const n = new Float64Array(240);
 * n[90] = 1;
 * if (Math.abs(sharpness(n) - 0.11 * 9.05) > 1e-12) throw new Error();
 * ```
 */
export function sharpness(specific: Float64Array): number {
  if (specific.length !== BARK_COUNT) {
    throw new RangeError(`sharpness takes N′ on ${BARK_COUNT} steps, got ${specific.length}`);
  }
  let moment = 0, total = 0;
  for (let k = 0; k < BARK_COUNT; k++) {
    moment += specific[k] * WEIGHTS[k];
    total += specific[k];
  }
  return total > 0 ? SHARPNESS_K * moment / total : NaN;
}
