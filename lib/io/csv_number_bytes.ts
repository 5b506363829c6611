/**
 * Numbers straight from a CSV file's bytes, with no string per cell: a cell
 * must match `[+-]digits[.digits][e[+-]digits]` (with the file's decimal
 * mark). Short decimals, whose digits form an integer below 2^53 and whose
 * power of ten is within ±22, are converted exactly by one correctly rounded
 * multiplication or division (Clinger 1990, "How to read floating point
 * numbers accurately"); every other cell goes to `Number()`. Either way the
 * value is the one `Number(text)` gives.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { type DecimalMark, describeBadNumber } from "./numbers.ts";

// Byte values as module constants of this file: V8 folds them into the scan.
const COMMA = 44, PLUS = 43, MINUS = 45, ZERO = 48, LOWER_E = 101, UPPER_E = 69;
const POWERS_OF_TEN = Array.from({ length: 23 }, (_, k) => 10 ** k); // exact up to 1e22
const TWO_53 = 2 ** 53;

/**
 * The number in `bytes[start, end)` written with decimal mark `mark` (the
 * byte `.` or `,`), or NaN when the cell is not such a number. The value is
 * the one `Number()` gives for the same text (with `,` read as `.`).
 *
 * @example
 * ```ts
 * import { parseNumberBytes } from "./csv_number_bytes.ts";
 * const b = new TextEncoder().encode("-1.25e-3|0,5|1e999|abc");
 * if (parseNumberBytes(b, 0, 8, 46) !== -0.00125) throw new Error();
 * if (parseNumberBytes(b, 9, 12, 44) !== 0.5) throw new Error();
 * if (parseNumberBytes(b, 13, 18, 46) !== Infinity) throw new Error();
 * if (!Number.isNaN(parseNumberBytes(b, 19, 22, 46))) throw new Error();
 * ```
 */
export function parseNumberBytes(
  bytes: Uint8Array,
  start: number,
  end: number,
  mark: number,
): number {
  return scanNumber(bytes, start, end, mark) === end ? scanned[VALUE] : NaN;
}

/**
 * What the last {@linkcode scanNumber} read: its value (at {@linkcode VALUE})
 * and its decimals (at {@linkcode DECIMALS}; Infinity with an exponent). A
 * typed array, not a returned double: the scan is too long for V8 to inline,
 * and a double returned from a call is boxed, one heap object per cell.
 */
export const scanned: Float64Array = new Float64Array(2);
/** Index of the value in {@linkcode scanned}. */
export const VALUE = 0;
/** Index of the decimals in {@linkcode scanned}. */
export const DECIMALS = 1;

/**
 * Reads the longest prefix of bytes[start, limit) that the number grammar
 * accepts into {@linkcode scanned} (value NaN when there is none) and
 * returns the position after it (`start` when there is none). `mark`: the
 * decimal mark's byte.
 *
 * @example
 * ```ts
 * import { scanNumber, scanned, VALUE } from "./csv_number_bytes.ts";
 * const b = new TextEncoder().encode("2.5;x");
 * if (scanNumber(b, 0, b.length, 46) !== 3 || scanned[VALUE] !== 2.5) throw new Error();
 * ```
 */
export function scanNumber(bytes: Uint8Array, start: number, limit: number, mark: number): number {
  let k = start;
  let negative = false;
  if (k < limit && (bytes[k] === PLUS || bytes[k] === MINUS)) negative = bytes[k++] === MINUS;
  // The first 9 digits (leading zeros included: they add nothing) in `high`,
  // a small integer, which V8 multiplies and adds far faster than a double;
  // the digits after them in `low`.
  let high = 0;
  let low = 0;
  let digits = 0;
  let b = 0;
  while (k < limit && (b = bytes[k] - ZERO) >= 0 && b <= 9) {
    if (digits < 9) high = high * 10 + b;
    else low = low * 10 + b;
    digits++;
    k++;
  }
  let decimals = 0;
  if (k < limit && bytes[k] === mark) {
    k++;
    while (k < limit && (b = bytes[k] - ZERO) >= 0 && b <= 9) {
      if (digits < 9) high = high * 10 + b;
      else low = low * 10 + b;
      digits++;
      decimals++;
      k++;
    }
  }
  if (digits === 0) {
    scanned[VALUE] = NaN;
    return start;
  }
  let exponent = 0;
  if (k < limit && (bytes[k] === LOWER_E || bytes[k] === UPPER_E)) {
    let e = k + 1;
    let expNegative = false;
    if (e < limit && (bytes[e] === PLUS || bytes[e] === MINUS)) expNegative = bytes[e++] === MINUS;
    const first = e;
    while (e < limit && (b = bytes[e] - ZERO) >= 0 && b <= 9) {
      if (exponent < 100000) exponent = exponent * 10 + b;
      e++;
    }
    if (e === first) {
      scanned[VALUE] = NaN; // "1e" is not a number: stop before the e
      return k;
    }
    k = e;
    if (expNegative) exponent = -exponent;
    scanned[DECIMALS] = Infinity;
  } else scanned[DECIMALS] = decimals;
  // Exact when the digits form an integer below 2^53 and the power of ten is
  // within ±22: one correctly rounded operation on two exact doubles
  // (Clinger's fast path). A computed mantissa below 2^53 proves both parts
  // were exact, as rounding is monotone.
  if (digits <= 9 + 22) {
    const mantissa = digits <= 9 ? high : high * POWERS_OF_TEN[digits - 9] + low;
    if (mantissa < TWO_53) {
      const power = exponent - decimals;
      const m = negative ? -mantissa : mantissa;
      if (mantissa === 0) {
        scanned[VALUE] = negative ? -0 : 0;
        return k;
      }
      if (power >= 0 && power <= 22) {
        scanned[VALUE] = m * POWERS_OF_TEN[power];
        return k;
      }
      if (power < 0 && power >= -22) {
        scanned[VALUE] = m / POWERS_OF_TEN[-power];
        return k;
      }
    }
  }
  // Long or extreme: the text itself, through Number().
  const written = decoder.decode(bytes.subarray(start, k));
  scanned[VALUE] = Number(mark === COMMA ? written.replace(",", ".") : written);
  return k;
}
const decoder = new TextDecoder();

/**
 * One cell's text as a number with the reader's rules, and its decimals.
 *
 * @throws {QuiverError} naming `line` and `column` (1-based) when it is not a finite number.
 */
export function parseCellText(
  cell: string,
  where: {
    /** The file's decimal mark. */
    mark: DecimalMark;
    /** 1-based line and column, for the message. */
    line: number;
    column: number;
    /** File name, for the message. */
    file?: string;
  },
): { value: number; decimals: number } {
  const { mark, line, column, file } = where;
  const bytes = new TextEncoder().encode(cell);
  const m = mark.charCodeAt(0);
  const value = parseNumberBytes(bytes, 0, bytes.length, m);
  if (value - value !== 0) {
    throw new QuiverError(describeBadNumber(cell, mark), { file, line, column });
  }
  return { value, decimals: scanned[DECIMALS] };
}
