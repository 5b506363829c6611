/**
 * The metadata of a `loudness` result (lib/quality/loudness_analysis.ts):
 * the schema the producer is type-checked against and readers (targets,
 * the report) parse with. Keys a reader does not use pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/** One row of the table: a channel's loudness and sharpness. */
export const LOUDNESS_ROW = z.looseObject({
  channel: z.string(),
  loudness: finiteOrNull,
  loudness_level: finiteOrNull,
  sharpness: finiteOrNull,
  n5: finiteOrNull,
  n10: finiteOrNull,
});

/**
 * The schema of a loudness result's metadata.
 *
 * @example
 * ```ts
 * import { LOUDNESS_METADATA } from "./loudness_metadata.ts";
 * const m = { analysis: "loudness", method: "stationary", field: "free", rate_hz: 48000,
 *   method_rate_hz: 48000, duration_s: 10, bands_beyond_recording_hz: [], standard: "…", safety: "…",
 *   rows: [{ channel: "mic", loudness: 1, loudness_level: 40, sharpness: 1, n5: null, n10: null }] };
 * if (!LOUDNESS_METADATA.safeParse(m).success || LOUDNESS_METADATA.safeParse({ ...m, field: "x" }).success) throw new Error();
 * ```
 */
export const LOUDNESS_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("loudness"),
  method: z.enum(["stationary", "time-varying"]),
  field: z.enum(["free", "diffuse"]),
  rate_hz: z.number(),
  method_rate_hz: z.number(),
  duration_s: z.number(),
  bands_beyond_recording_hz: z.array(z.number()),
  standard: z.string(),
  safety: z.string(),
  rows: z.array(LOUDNESS_ROW),
});

/** A loudness result's metadata as `loudnessAnalysis` writes it. */
export type LoudnessMetadata = Written<z.input<typeof LOUDNESS_METADATA>>;
