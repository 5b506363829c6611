/**
 * The metadata of a `damping` result (lib/modal/damping_analysis.ts): the
 * schema the producer is type-checked against and readers (targets, the
 * report) parse with (lib/io/result_metadata.ts). Keys a reader does not use
 * pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

const mode = z.looseObject({
  channel: z.string(),
  // null: a candidate flagged noise, listed but not a mode (damping_analysis.ts).
  mode: z.number().nullable(),
  frequencyHz: finiteOrNull,
  dampingRatio: finiteOrNull,
  qFactor: finiteOrNull,
  method: z.string(),
  flags: z.array(z.string()),
  halfPower: z.looseObject({ dampingRatio: finiteOrNull }).optional(),
});

/**
 * The schema of a damping result's metadata.
 *
 * @example
 * ```ts
 * import { DAMPING_METADATA } from "./damping_metadata.ts";
 * const m = { analysis: "damping", modes: [{ channel: "a", mode: 1, frequencyHz: 50, dampingRatio: 0.02,
 *   qFactor: 25, method: "half-power", flags: [] }] };
 * if (!DAMPING_METADATA.safeParse(m).success || DAMPING_METADATA.safeParse({ ...m, modes: [{}] }).success) throw new Error();
 * ```
 */
export const DAMPING_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("damping"),
  modes: z.array(mode),
});

/** A damping result's metadata as `modalDamping` writes it. */
export type DampingMetadata = Written<z.input<typeof DAMPING_METADATA>>;
