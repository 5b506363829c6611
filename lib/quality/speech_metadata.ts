/**
 * The metadata of a `speech` result (lib/quality/speech_analysis.ts): the
 * schema the producer is type-checked against and readers (targets, the
 * report) parse with. Keys a reader does not use pass through unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, finiteOrNull, type Written } from "../io/result_common.ts";

/**
 * The schema of a speech intelligibility result's metadata.
 *
 * @example
 * ```ts
 * import { SPEECH_METADATA } from "./speech_metadata.ts";
 * const m = { analysis: "speech", standard: "ANSI S3.5-1997", speech_spectrum: "normal",
 *   hearing: "0 dB HL", rate_hz: 25600, rows: [{ channel: "mic", sii: 0.6 }], safety: "…" };
 * if (!SPEECH_METADATA.safeParse(m).success) throw new Error();
 * if (SPEECH_METADATA.safeParse({ ...m, rows: [{ channel: "mic" }] }).success) throw new Error();
 * ```
 */
export const SPEECH_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("speech"),
  standard: z.string(),
  speech_spectrum: z.string(),
  hearing: z.string(),
  rate_hz: z.number(),
  rows: z.array(z.looseObject({ channel: z.string(), sii: finiteOrNull })),
  safety: z.string(),
});

/** A speech result's metadata as `speechAnalysis` writes it. */
export type SpeechMetadata = Written<z.input<typeof SPEECH_METADATA>>;
