/**
 * Strict parsing of numeric text cells. `Number()` would read "" as 0 and
 * accept "Infinity" and hex; a measurement file must not be read that way.
 *
 * @module
 */

/** The decimal mark of a numeric cell. */
export type DecimalMark = "." | ",";

const DOT_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const COMMA_NUMBER = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/;

/**
 * Parses a decimal number written with the given decimal mark, or returns
 * undefined when the cell is not such a number (including NaN and Inf).
 *
 * @example
 * ```ts
 * import { parseDecimal } from "./numbers.ts";
 * if (parseDecimal("-1,5e3", ",") !== -1500) throw new Error();
 * if (parseDecimal("", ".") !== undefined) throw new Error();
 * ```
 */
export function parseDecimal(cell: string, mark: DecimalMark): number | undefined {
  if (mark === ".") {
    return DOT_NUMBER.test(cell) ? Number(cell) : undefined;
  }
  return COMMA_NUMBER.test(cell) ? Number(cell.replace(",", ".")) : undefined;
}

/**
 * Says why a cell is not a number, for error messages.
 *
 * @example
 * ```ts
 * import { describeBadNumber } from "./numbers.ts";
 * if (!describeBadNumber("NaN", ".").includes("finite")) throw new Error();
 * ```
 */
export function describeBadNumber(cell: string, mark: DecimalMark): string {
  if (cell === "") return "empty cell where a number was expected";
  if (/^[+-]?(nan|inf|infinity)$/i.test(cell)) {
    return `"${cell}" is not a finite number; NaN and infinite values are not accepted`;
  }
  const value = parseDecimal(cell, mark);
  if (value !== undefined && !Number.isFinite(value)) {
    return `"${cell}" is beyond the range of a double-precision number`;
  }
  const other: DecimalMark = mark === "." ? "," : ".";
  if (cell.includes(other) && parseDecimal(cell, other) !== undefined) {
    return `"${cell}" uses "${other}" as decimal mark, but this file uses "${mark}"`;
  }
  return `"${cell}" is not a number`;
}
