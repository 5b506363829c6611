/**
 * The metadata of a `comfort` result (lib/comfort/comfort_analysis.ts), and
 * the per-row record it shares with `hand-arm`'s: the schema the producer is
 * type-checked against and readers (targets, the report) parse with. Keys a
 * reader does not use pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/** One row of the table: a channel or axis, or the `sum`. */
export const VIBRATION_ROW = z.looseObject({
  axis: z.string(),
  channel: z.string(),
  weighting: z.string(),
  k: finiteOrNull,
  aw: finiteOrNull,
  mtvv: finiteOrNull,
  vdv: finiteOrNull,
  crest_factor: finiteOrNull,
  mtvv_ratio: finiteOrNull,
  vdv_ratio: finiteOrNull,
  flags: z.array(z.string()),
});

/** A weighting filter as designed for the recording's rate. */
export const WEIGHTING_FILTER = z.looseObject({
  weighting: z.string(),
  least_rate_hz: z.number(),
  worst_deviation_db: z.number(),
});

/**
 * The schema of a comfort result's metadata.
 *
 * @example
 * ```ts
 * import { COMFORT_METADATA } from "./comfort_metadata.ts";
 * const row = { axis: "z", channel: "seat_z", weighting: "wk", k: 1, aw: 0.3, mtvv: 0.4, vdv: 1,
 *   crest_factor: 3, mtvv_ratio: 1.3, vdv_ratio: 1.4, flags: [] };
 * const m = { analysis: "comfort", unit: "m/s^2", rate_hz: 1000, tau_s: 1, duration_s: 10,
 *   location: "seat", purpose: "comfort", rows: [row], filters: [], safety: "…" };
 * if (!COMFORT_METADATA.safeParse(m).success || COMFORT_METADATA.safeParse({ ...m, rows: [{}] }).success) throw new Error();
 * ```
 */
export const COMFORT_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("comfort"),
  unit: z.string(),
  rate_hz: z.number(),
  tau_s: z.number(),
  duration_s: z.number(),
  location: z.string().nullable(),
  purpose: z.string().nullable(),
  rows: z.array(VIBRATION_ROW),
  filters: z.array(WEIGHTING_FILTER),
  safety: z.string(),
});

/** A comfort result's metadata as `comfortAnalysis` writes it. */
export type ComfortMetadata = Written<z.input<typeof COMFORT_METADATA>>;
