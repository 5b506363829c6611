/**
 * The metadata of a `hand-arm` result (lib/comfort/comfort_analysis.ts):
 * the rows of comfort's (comfort_metadata.ts), the vibration total value
 * a_hv and, with an exposure time, the daily exposure A(8).
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";
import { VIBRATION_ROW, WEIGHTING_FILTER } from "./comfort_metadata.ts";

/**
 * The schema of a hand-arm result's metadata.
 *
 * @example
 * ```ts
 * import { HAND_ARM_METADATA } from "./hand_arm_metadata.ts";
 * const m = { analysis: "hand-arm", unit: "m/s^2", rate_hz: 10000, tau_s: 1, duration_s: 10,
 *   rows: [], filters: [], a_hv: 2, exposure_hours: 2, a8: 1, safety: "…" };
 * if (!HAND_ARM_METADATA.safeParse(m).success || HAND_ARM_METADATA.safeParse({ ...m, a_hv: "2" }).success) throw new Error();
 * ```
 */
export const HAND_ARM_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("hand-arm"),
  unit: z.string(),
  rate_hz: z.number(),
  tau_s: z.number(),
  duration_s: z.number(),
  rows: z.array(VIBRATION_ROW),
  filters: z.array(WEIGHTING_FILTER),
  a_hv: finiteOrNull,
  exposure_hours: z.number().nullable(),
  a8: finiteOrNull,
  safety: z.string(),
});

/** A hand-arm result's metadata as `handArmAnalysis` writes it. */
export type HandArmMetadata = Written<z.input<typeof HAND_ARM_METADATA>>;
