/**
 * The one message for a recording that is neither WAV nor UTF-8 text, used
 * by the whole-file and the chunked reader alike.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";

/**
 * The error for a file holding bytes that are not UTF-8 (and no WAV header).
 *
 * @example
 * ```ts
 * import { notUtf8Text } from "./text_encoding.ts";
 * if (!notUtf8Text("a.csv").message.startsWith("a.csv: ")) throw new Error();
 * ```
 */
export function notUtf8Text(path: string): QuiverError {
  return new QuiverError(
    "neither a WAV file nor UTF-8 text; quiver reads CSV and WAV recordings (save a CSV as UTF-8: a header in Latin-1 or Windows-1252, e.g. with µ or °, is not UTF-8)",
    { file: path },
  );
}
