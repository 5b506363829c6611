/**
 * The metadata of the results of `hammer` (lib/frf/hammer.ts): the FRF from
 * hits and the record of each hit. The schemas the producer is type-checked
 * against and readers parse with (lib/io/result_metadata.ts); keys a reader
 * does not use pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { channelSchema, type Written } from "../io/result_common.ts";
import { FRF_METADATA } from "./frf_metadata.ts";

/**
 * The schema of a hammer FRF's metadata: an FRF's, with its usable bandwidth.
 *
 * @example
 * ```ts
 * import { HAMMER_METADATA } from "./hammer_metadata.ts";
 * const m = { analysis: "hammer", estimator: "h1", averages: 5, responses: [], usable_bandwidth_hz: null };
 * if (!HAMMER_METADATA.safeParse(m).success || HAMMER_METADATA.safeParse({ ...m, analysis: "frf" }).success) throw new Error();
 * ```
 */
export const HAMMER_METADATA = FRF_METADATA.extend({
  analysis: z.literal("hammer"),
  usable_bandwidth_hz: z.number().nullable().optional(),
  usable_bandwidth_drop_db: z.number().optional(),
});

/** A hammer FRF's metadata as `hammerFrf` writes it. */
export type HammerMetadata = Written<z.input<typeof HAMMER_METADATA>>;

/**
 * The schema of the hit records' metadata: force and response channel, and
 * each hit's status.
 *
 * @example
 * ```ts
 * import { HAMMER_RECORDS_METADATA } from "./hammer_metadata.ts";
 * const m = { analysis: "hammer_records", force: { name: "F", unit: "N" }, response: { name: "a", unit: "g" },
 *   hits: [{ hit: 1, status: "accepted", reason: null }] };
 * if (!HAMMER_RECORDS_METADATA.safeParse(m).success) throw new Error();
 * ```
 */
export const HAMMER_RECORDS_METADATA = z.looseObject({
  analysis: z.literal("hammer_records"),
  force: channelSchema,
  response: channelSchema,
  hits: z.array(z.looseObject({
    hit: z.number(),
    status: z.string(),
    reason: z.string().nullable(),
  })),
});

/** The hit records' metadata as `hammerFrf` writes it. */
export type HammerRecordsMetadata = Written<z.input<typeof HAMMER_RECORDS_METADATA>>;
