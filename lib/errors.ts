/**
 * The project's own error type. A {@linkcode QuiverError} says what is wrong
 * with a piece of input and, where it is known, where: the file, the 1-based
 * line and the 1-based column. Its `kind` tells the command line which exit
 * code to use: `"data"` (exit 1) for a recording or table that cannot be
 * used, `"usage"` (exit 2) for options that contradict each other or the data.
 *
 * Library functions that receive an impossible parameter throw the fitting
 * built-in class instead (RangeError, TypeError); the command line treats
 * those as usage errors because they come from options.
 *
 * @module
 */

/** Where in an input a problem was found. Every field is optional. */
export interface ErrorLocation {
  /** Path of the file, as the user gave it. */
  file?: string;
  /** 1-based line number in a text file. */
  line?: number;
  /** 1-based column number (field index for CSV). */
  column?: number;
}

/** Which exit code an error maps to: data problems 1, usage problems 2. */
export type ErrorKind = "data" | "usage";

/**
 * An error in the user's input, carrying its location.
 *
 * @example
 * ```ts
 * import { QuiverError } from "./errors.ts";
 * const e = new QuiverError("text in a numeric cell", { file: "a.csv", line: 3, column: 2 });
 * if (e.message !== "a.csv:3:2: text in a numeric cell") throw new Error();
 * ```
 */
export class QuiverError extends Error {
  /** File, line and column, where known. */
  readonly location: ErrorLocation;
  /** Data (exit 1) or usage (exit 2). */
  readonly kind: ErrorKind;
  /** The message without its location prefix. */
  readonly detail: string;

  constructor(
    detail: string,
    location: ErrorLocation = {},
    kind: ErrorKind = "data",
  ) {
    super(`${formatLocation(location)}${detail}`);
    this.name = "QuiverError";
    this.detail = detail;
    this.location = location;
    this.kind = kind;
  }
}

/**
 * Formats a location as `file:line:column: ` (only the parts that are known),
 * or the empty string.
 *
 * @example
 * ```ts
 * import { formatLocation } from "./errors.ts";
 * if (formatLocation({ file: "r.wav" }) !== "r.wav: ") throw new Error();
 * ```
 */
export function formatLocation(location: ErrorLocation): string {
  const parts: string[] = [];
  if (location.file !== undefined) parts.push(location.file);
  if (location.line !== undefined) parts.push(String(location.line));
  if (location.column !== undefined) parts.push(String(location.column));
  return parts.length === 0 ? "" : `${parts.join(":")}: `;
}

/**
 * Returns `error` with `file` as its location when it is a
 * {@linkcode QuiverError} that names no file yet; anything else unchanged.
 * Analyses do not know file names; commands attach them.
 *
 * @example
 * ```ts
 * import { QuiverError, withFile } from "./errors.ts";
 * const e = withFile(new QuiverError("record too short"), "road.csv");
 * if (!(e instanceof QuiverError) || e.message !== "road.csv: record too short") throw new Error();
 * ```
 */
export function withFile(error: unknown, file: string): unknown {
  if (error instanceof QuiverError && error.location.file === undefined) {
    return new QuiverError(error.detail, { ...error.location, file }, error.kind);
  }
  return error;
}
