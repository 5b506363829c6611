/**
 * The metadata of a `mac` result (lib/modal/shapes.ts): the schema the
 * producer is type-checked against and readers (targets, the report) parse
 * with (lib/io/result_metadata.ts). Keys a reader does not use pass through
 * unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/**
 * The schema of a shape correlation's metadata.
 *
 * @example
 * ```ts
 * import { MAC_METADATA } from "./mac_metadata.ts";
 * const pair = { test_mode: 1, simulation_mode: 1, test_hz: 50, simulation_hz: 51, shift_percent: 2, mac: 0.97,
 *   rival: { side: "test", mode: 2, mac: 0.9 } };
 * const m = { analysis: "mac", dofs_used: 9, dofs_test_only: 0, dofs_simulation_only: 0, auto_mac: [[1]], pairs: [pair] };
 * if (!MAC_METADATA.safeParse(m).success) throw new Error();
 * if (MAC_METADATA.safeParse({ ...m, pairs: [{ ...pair, rival: { ...pair.rival, extra: 1 } }] }).success) throw new Error();
 * ```
 */
export const MAC_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("mac"),
  dofs_used: z.number(),
  dofs_test_only: z.number(),
  dofs_simulation_only: z.number(),
  auto_mac: z.array(z.array(finiteOrNull)),
  pairs: z.array(z.looseObject({
    test_mode: z.number(),
    simulation_mode: z.number(),
    test_hz: finiteOrNull,
    simulation_hz: finiteOrNull,
    shift_percent: finiteOrNull,
    mac: z.number(),
    ambiguous: z.boolean().optional(),
    rival: z.strictObject({
      side: z.enum(["simulation", "test"]),
      mode: z.number(),
      mac: z.number(),
    }).nullable().optional(),
  })),
});

/** A shape correlation's metadata as `correlationTables` writes it. */
export type MacMetadata = Written<z.input<typeof MAC_METADATA>>;
