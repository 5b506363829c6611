/**
 * The metadata of a `level` result (lib/acoustics/level_analysis.ts): the
 * schema the producer is type-checked against and readers (targets, the
 * report) parse with (lib/io/result_metadata.ts). Keys a reader does not use
 * pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/**
 * The schema of a level history's metadata.
 *
 * @example
 * ```ts
 * import { LEVEL_METADATA } from "./level_metadata.ts";
 * const m = { analysis: "level", weighting: "A", time_weighting: "fast",
 *   summary: [{ channel: "mic", unit: "dB(A)", leq_db: 70, lmax_db: 80 }] };
 * if (!LEVEL_METADATA.safeParse(m).success || LEVEL_METADATA.safeParse({ ...m, summary: [{}] }).success) throw new Error();
 * ```
 */
export const LEVEL_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("level"),
  weighting: z.string(),
  time_weighting: z.string(),
  summary: z.array(z.looseObject({
    channel: z.string(),
    unit: z.string(),
    leq_db: finiteOrNull,
    lmax_db: finiteOrNull,
  })),
});

/** A level history's metadata as `levelHistory` writes it. */
export type LevelMetadata = Written<z.input<typeof LEVEL_METADATA>>;
