/**
 * The metadata of a `bands` result (lib/acoustics/band_analysis.ts): the
 * schema the producer is type-checked against and readers (targets, the
 * report) parse with (lib/io/result_metadata.ts). Keys a reader does not use
 * pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/**
 * The schema of a band levels result's metadata.
 *
 * @example
 * ```ts
 * import { BANDS_METADATA } from "./bands_metadata.ts";
 * const m = { analysis: "bands", fraction: 3, weighting: "A", overall: [{ channel: "mic", level_db: null, unit: "dB(A)" }] };
 * if (!BANDS_METADATA.safeParse(m).success || BANDS_METADATA.safeParse({ ...m, fraction: "3" }).success) throw new Error();
 * ```
 */
export const BANDS_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("bands"),
  fraction: z.number(),
  weighting: z.string(),
  overall: z.array(
    z.looseObject({ channel: z.string(), level_db: finiteOrNull, unit: z.string() }),
  ),
});

/** A band levels result's metadata as `bandLevels` writes it. */
export type BandsMetadata = Written<z.input<typeof BANDS_METADATA>>;
