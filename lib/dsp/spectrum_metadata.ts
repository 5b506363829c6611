/**
 * The metadata of a `spectrum` result, as its readers (report, targets,
 * compare) use it: the schema `averagedSpectrum` (averaged_spectrum.ts) is type-checked
 * against and readers parse with (lib/io/result_metadata.ts). Keys a reader
 * does not use pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, type Written } from "../io/result_common.ts";

/**
 * The schema of a spectrum's metadata.
 *
 * @example
 * ```ts
 * import { SPECTRUM_METADATA } from "./spectrum_metadata.ts";
 * const m = { analysis: "spectrum", kind: "rms", df_hz: 1, averages: 3, window: "hann" };
 * if (!SPECTRUM_METADATA.safeParse(m).success) throw new Error();
 * if (SPECTRUM_METADATA.safeParse({ ...m, kind: "psd2" }).success) throw new Error("an unknown kind");
 * ```
 */
export const SPECTRUM_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("spectrum"),
  kind: z.enum(["psd", "power", "rms", "peak"]),
  df_hz: z.number(),
  averages: z.number(),
  window: z.string(),
});

/** A spectrum's metadata as `averagedSpectrum` writes it. */
export type SpectrumMetadata = Written<z.input<typeof SPECTRUM_METADATA>>;
