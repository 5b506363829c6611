/**
 * The dialect of a CSV file: its delimiter (`,`, `;` or a tab; `auto` takes
 * `;` or a tab when the header holds one) and its decimal mark (`auto`: `.`
 * with the `,` delimiter; with `;` or a tab the mark of the first number
 * that shows one), and the names the command line gives the delimiters.
 *
 * @module
 */
import type { DecimalMark } from "./numbers.ts";

/** The delimiters the reader accepts. */
export type CsvDelimiter = "," | ";" | "\t";

/** Options of the CSV reader. */
export interface CsvTableOptions {
  /** File name used in error messages. Default: none. */
  file?: string;
  /** Field delimiter. Default `"auto"`. */
  delimiter?: CsvDelimiter | "auto";
  /** Decimal mark. Default `"auto"` (see the module notes). */
  decimal?: DecimalMark | "auto";
}

/** The delimiters by the names the command line gives them (`--delimiter`). */
export const DELIMITER_NAMES: Readonly<Record<CsvDelimiter, string>> = {
  ",": "comma",
  ";": "semicolon",
  "\t": "tab",
};

/**
 * The delimiter a header row suggests: `;` when it holds one, else a tab
 * when it holds one, else `,`.
 *
 * @example
 * ```ts
 * import { detectDelimiter } from "./csv_dialect.ts";
 * if (detectDelimiter("a;b") !== ";" || detectDelimiter("a,b") !== ",") throw new Error();
 * ```
 */
export function detectDelimiter(headerLine: string): CsvDelimiter {
  if (headerLine.includes(";")) return ";";
  if (headerLine.includes("\t")) return "\t";
  return ",";
}
