/**
 * The metadata of an `frf` result (lib/frf/frf_analysis.ts), which a
 * hammer result extends (hammer_metadata.ts): the schema the producers are
 * type-checked against and readers (damping, modal, compare, targets, the
 * report) parse with (lib/io/result_metadata.ts). Keys a reader does not use
 * pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, type Written } from "../io/result_common.ts";

const frfResponse = z.looseObject({
  name: z.string(),
  unit: z.string(),
  form: z.enum(["receptance", "mobility", "accelerance"]).nullable(),
  frf_unit: z.string(),
});

/**
 * The schema of an FRF's metadata (an FRF from hammer hits passes too).
 *
 * @example
 * ```ts
 * import { FRF_METADATA } from "./frf_metadata.ts";
 * const m = { analysis: "frf", estimator: "h1", averages: 8,
 *   responses: [{ name: "acc", unit: "m/s^2", form: "accelerance", frf_unit: "(m/s^2)/N" }] };
 * if (!FRF_METADATA.safeParse(m).success || FRF_METADATA.safeParse({ ...m, averages: "8" }).success) throw new Error();
 * ```
 */
export const FRF_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.enum(["frf", "hammer"]),
  estimator: z.string(),
  averages: z.number(),
  responses: z.array(frfResponse),
  exponential_window_tau_s: z.number().nullable().optional(),
  hits_summary: z.string().optional(),
});

/** An FRF's metadata as `frequencyResponse` (frf_analysis.ts) writes it. */
export type FrfMetadata = Written<z.input<typeof FRF_METADATA>>;
