/**
 * The metadata of a `tones` result (lib/quality/tones_analysis.ts): the
 * schema the producer is type-checked against and readers (targets, the
 * report) parse with. Keys a reader does not use pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { channelSchema, COMMON_FIELDS, type Written } from "../io/result_common.ts";
import { CRITERIA } from "./tones_criteria.ts";

/**
 * The schema of a tones result's metadata.
 *
 * @example
 * ```ts
 * import { TONES_METADATA } from "./tones_metadata.ts";
 * const m = { analysis: "tones", against: "time", standard: "ECMA-418-1", criterion: "tnr", min_tnr_db: 0,
 *   criteria_range_hz: [89.1, 11220], orders: [], channels: [{ name: "mic", unit: "Pa" }], rate_hz: 48000,
 *   block: 32768, df_hz: 1.46, safety: "…" };
 * if (!TONES_METADATA.safeParse(m).success || TONES_METADATA.safeParse({ ...m, against: "angle" }).success) throw new Error();
 * ```
 */
export const TONES_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("tones"),
  against: z.enum(["time", "rpm"]),
  standard: z.string(),
  criterion: z.enum(CRITERIA),
  min_tnr_db: z.number(),
  criteria_range_hz: z.tuple([z.number(), z.number()]),
  orders: z.array(z.number()),
  channels: z.array(channelSchema),
  rate_hz: z.number(),
  block: z.number(),
  df_hz: z.number(),
  safety: z.string(),
});

/** A tones result's metadata as `tonesAnalysis` writes it. */
export type TonesMetadata = Written<z.input<typeof TONES_METADATA>>;
