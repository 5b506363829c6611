/**
 * The metadata of a `modal` result (lib/modal/modal_fit.ts): the schema the
 * producer is type-checked against and readers (mac, targets, the report)
 * parse with (lib/io/result_metadata.ts). Keys a reader does not use pass
 * through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/**
 * The schema of a modal fit's metadata.
 *
 * @example
 * ```ts
 * import { MODAL_METADATA } from "./modal_metadata.ts";
 * const m = { analysis: "modal", method: "lscf", dofs: [{ point: "1", direction: "z" }], fit_relative_error: [null],
 *   modes: [{ mode: 1, frequencyHz: 50, dampingRatio: 0.01, mpc: 0.99, flags: [] }] };
 * if (!MODAL_METADATA.safeParse(m).success || MODAL_METADATA.safeParse({ ...m, dofs: [1] }).success) throw new Error();
 * ```
 */
export const MODAL_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("modal"),
  method: z.string(),
  dofs: z.array(z.looseObject({ point: z.string(), direction: z.string() })),
  fit_relative_error: z.array(finiteOrNull),
  geometry: z.looseObject({
    points: z.array(
      z.looseObject({ point: z.string(), x: z.number(), y: z.number(), z: z.number() }),
    ),
    lines: z.array(z.tuple([z.string(), z.string()])),
  }).optional(),
  modes: z.array(z.looseObject({
    mode: z.number(),
    frequencyHz: z.number(),
    dampingRatio: z.number(),
    mpc: finiteOrNull,
    flags: z.array(z.string()),
  })),
});

/** A modal fit's metadata as `modalTables` writes it. */
export type ModalMetadata = Written<z.input<typeof MODAL_METADATA>>;
