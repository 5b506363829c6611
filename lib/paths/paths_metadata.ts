/**
 * The metadata of a `paths` result (lib/paths/contributions.ts): the schema
 * the producer is type-checked against and readers (targets, the report)
 * parse with (lib/io/result_metadata.ts). Keys a reader does not use pass
 * through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { channelSchema, COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/**
 * The schema of a path contribution result's metadata.
 *
 * @example
 * ```ts
 * import { PATHS_METADATA } from "./paths_metadata.ts";
 * const m = { analysis: "paths", method: "direct", paths: [{ name: "mount" }], target: { name: "p", unit: "Pa" },
 *   level_unit: "dB re 20 µPa", ranking: [{ band: "analysed range", paths: [{ name: "mount", level_db: 60, share_percent: null }] }] };
 * if (!PATHS_METADATA.safeParse(m).success || PATHS_METADATA.safeParse({ ...m, method: "tpa" }).success) throw new Error();
 * ```
 */
export const PATHS_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("paths"),
  method: z.enum(["direct", "inverse"]),
  paths: z.array(z.looseObject({ name: z.string() })),
  target: channelSchema,
  level_unit: z.string(),
  ranking: z.array(z.looseObject({
    band: z.string(),
    paths: z.array(z.looseObject({
      name: z.string(),
      level_db: finiteOrNull,
      share_percent: finiteOrNull,
    })),
  })),
});

/** A path contribution result's metadata as `pathContributions` writes it. */
export type PathsMetadata = Written<z.input<typeof PATHS_METADATA>>;
