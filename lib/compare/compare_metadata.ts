/**
 * The metadata of a `compare` result (lib/compare/comparison.ts): the
 * schema the producer is type-checked against and readers (targets, the
 * report) parse with (lib/io/result_metadata.ts). Keys a reader does not use
 * pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/**
 * The schema of a comparison's metadata.
 *
 * @example
 * ```ts
 * import { COMPARE_METADATA } from "./compare_metadata.ts";
 * const m = { analysis: "compare", frac: 0.9, frac_on: "magnitude", peaks: [], grid: { from: "test", lines: 100 } };
 * if (!COMPARE_METADATA.safeParse(m).success || COMPARE_METADATA.safeParse({ ...m, frac_on: "phase" }).success) throw new Error();
 * ```
 */
export const COMPARE_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("compare"),
  frac: finiteOrNull,
  frac_on: z.enum(["complex", "magnitude"]),
  peaks: z.array(z.looseObject({
    test_hz: z.number(),
    simulation_hz: z.number(),
    shift_percent: z.number(),
    level_difference_db: finiteOrNull,
  })),
  grid: z.looseObject({ from: z.enum(["test", "simulation"]), lines: z.number() }),
  bands: z.array(z.looseObject({ nominal_hz: z.number(), difference_db: finiteOrNull }))
    .optional(),
  test: z.string().optional(),
  simulation: z.string().optional(),
});

/** A comparison's metadata as `compareCurves` writes it. */
export type CompareMetadata = Written<z.input<typeof COMPARE_METADATA>>;
