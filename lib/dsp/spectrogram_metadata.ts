/**
 * The metadata of a `spectrogram` result, against time (lib/dsp/spectrogram.ts)
 * or against rpm (lib/orders/rpm_spectrogram.ts): the schema both producers
 * are type-checked against and readers parse with (lib/io/result_metadata.ts).
 * Keys a reader does not use pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, type Written } from "../io/result_common.ts";

/**
 * The schema of a spectrogram's metadata.
 *
 * @example
 * ```ts
 * import { SPECTROGRAM_METADATA } from "./spectrogram_metadata.ts";
 * const m = { analysis: "spectrogram", against: "rpm", kind: "rms", db: true, order_lines: [2] };
 * if (!SPECTROGRAM_METADATA.safeParse(m).success) throw new Error();
 * if (SPECTROGRAM_METADATA.safeParse({ ...m, against: "angle" }).success) throw new Error();
 * ```
 */
export const SPECTROGRAM_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("spectrogram"),
  against: z.enum(["time", "rpm"]),
  kind: z.enum(["psd", "power", "rms", "peak"]),
  db: z.boolean(),
  order_lines: z.array(z.number()).optional(),
});

/** A spectrogram's metadata as its producers write it. */
export type SpectrogramMetadata = Written<z.input<typeof SPECTROGRAM_METADATA>>;
