/**
 * The metadata of the results of a multiple-input FRF (lib/frf/multiple_input.ts):
 * the FRF matrix, the partial coherences and the principal components. The
 * schemas the producer is type-checked against and readers parse with
 * (lib/io/result_metadata.ts); keys a reader does not use pass through
 * unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { channelSchema, COMMON_FIELDS, type Written } from "../io/result_common.ts";

/**
 * The schema of an FRF matrix's metadata.
 *
 * @example
 * ```ts
 * import { FRF_MATRIX_METADATA } from "./frf_matrix_metadata.ts";
 * const m = { analysis: "frf_matrix", averages: 9, inputs: [{ name: "f1", unit: "N" }], outputs: [] };
 * if (!FRF_MATRIX_METADATA.safeParse(m).success || FRF_MATRIX_METADATA.safeParse({ ...m, averages: null }).success) throw new Error();
 * ```
 */
export const FRF_MATRIX_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("frf_matrix"),
  averages: z.number(),
  inputs: z.array(channelSchema),
  outputs: z.array(channelSchema),
});

/** An FRF matrix's metadata as `multipleInputFrf` writes it. */
export type FrfMatrixMetadata = Written<z.input<typeof FRF_MATRIX_METADATA>>;

/**
 * The schema of the partial coherences' metadata.
 *
 * @example
 * ```ts
 * import { FRF_PARTIAL_METADATA } from "./frf_matrix_metadata.ts";
 * if (!FRF_PARTIAL_METADATA.safeParse({ analysis: "frf_partial", inputs: [], outputs: [] }).success) throw new Error();
 * ```
 */
export const FRF_PARTIAL_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("frf_partial"),
  inputs: z.array(channelSchema),
  outputs: z.array(channelSchema),
});

/** The partial coherences' metadata as `multipleInputFrf` writes it. */
export type FrfPartialMetadata = Written<z.input<typeof FRF_PARTIAL_METADATA>>;

/**
 * The schema of the principal components' metadata.
 *
 * @example
 * ```ts
 * import { FRF_PRINCIPAL_METADATA } from "./frf_matrix_metadata.ts";
 * if (!FRF_PRINCIPAL_METADATA.safeParse({ analysis: "frf_principal", inputs: [], outputs: [] }).success) throw new Error();
 * ```
 */
export const FRF_PRINCIPAL_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("frf_principal"),
  inputs: z.array(channelSchema),
  outputs: z.array(channelSchema),
});

/** The principal components' metadata as `multipleInputFrf` writes it. */
export type FrfPrincipalMetadata = Written<z.input<typeof FRF_PRINCIPAL_METADATA>>;
