/**
 * ECMA-418-1's criteria for a prominent discrete tone (all from memory, as
 * ECMA-74 Annex D gives them too): a tone between 89.1 Hz and 11.22 kHz is
 * prominent when its TNR is at least 8 dB at and above 1 kHz and
 * 8 + 8.33·lg(1000/f) dB below, or its PR at least 9 dB at and above 1 kHz
 * and 9 + 10·lg(1000/f) dB below.
 *
 * @module
 */

/** The frequency range the criteria cover, Hz (from memory). */
export const CRITERIA_RANGE_HZ: readonly [number, number] = [89.1, 11_220];

/** The criteria quiver judges by. */
export const CRITERIA = ["tnr", "pr"] as const;

/** A criterion: the tone-to-noise ratio's or the prominence ratio's. */
export type Criterion = typeof CRITERIA[number];

const inRange = (f: number) => f >= CRITERIA_RANGE_HZ[0] && f <= CRITERIA_RANGE_HZ[1];

/**
 * The least TNR of a prominent tone at `f` Hz, dB; undefined outside
 * {@linkcode CRITERIA_RANGE_HZ}.
 *
 * @example
 * ```ts
 * import { tnrCriterion } from "./tones_criteria.ts";
 * if (tnrCriterion(2000) !== 8 || Math.abs(tnrCriterion(100)! - 16.33) > 1e-12) throw new Error();
 * if (tnrCriterion(50) !== undefined) throw new Error();
 * ```
 */
export function tnrCriterion(f: number): number | undefined {
  if (!inRange(f)) return undefined;
  return f >= 1000 ? 8 : 8 + 8.33 * Math.log10(1000 / f);
}

/**
 * The least PR of a prominent tone at `f` Hz, dB; undefined outside
 * {@linkcode CRITERIA_RANGE_HZ}.
 *
 * @example
 * ```ts
 * import { prCriterion } from "./tones_criteria.ts";
 * if (prCriterion(1000) !== 9 || Math.abs(prCriterion(100)! - 19) > 1e-12) throw new Error();
 * ```
 */
export function prCriterion(f: number): number | undefined {
  if (!inRange(f)) return undefined;
  return f >= 1000 ? 9 : 9 + 10 * Math.log10(1000 / f);
}

/**
 * A tone's verdict by `criterion`: the margin (ratio − criterion, dB) and
 * whether it is prominent (margin ≥ 0). Outside the criteria's range, or
 * with a ratio that is not finite, the margin is NaN and the tone is not
 * called prominent.
 *
 * @example
 * ```ts
 * import { verdict } from "./tones_criteria.ts";
 * const v = verdict("tnr", 1500, { tnrDb: 10, prDb: 3 });
 * if (v.marginDb !== 2 || !v.prominent || verdict("pr", 1500, { tnrDb: 10, prDb: 3 }).prominent) throw new Error();
 * ```
 */
export function verdict(
  criterion: Criterion,
  f: number,
  ratios: { tnrDb: number; prDb: number },
): { marginDb: number; prominent: boolean } {
  const limit = criterion === "tnr" ? tnrCriterion(f) : prCriterion(f);
  const ratio = criterion === "tnr" ? ratios.tnrDb : ratios.prDb;
  const marginDb = limit === undefined ? NaN : ratio - limit;
  return { marginDb, prominent: marginDb >= 0 };
}
