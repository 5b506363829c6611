/**
 * Pass 2 of the CSV reader ({@linkcode CsvRowParser}): splits the data rows
 * into cells and turns each cell into a number straight from its bytes, with
 * no string per cell; the bytes are pushed chunk by chunk, from the file's
 * start.
 *
 * Numbers: a cell must match `[+-]digits[.digits][e[+-]digits]` (with the
 * file's decimal mark). Short decimals, whose digits form an integer below
 * 2^53 and whose power of ten is within ±22, are converted exactly by one
 * correctly rounded multiplication or division (Clinger 1990, "How to read
 * floating point numbers accurately"); every other cell goes to `Number()`.
 * Either way the value is the one `Number(text)` gives. The number scan
 * lives in this file with the row loop that calls it once per cell: from
 * another module, its result array is an imported binding, measured a few
 * per cent slower on the bench's CSV.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { appended, concat, isSpace, recordEnd, text } from "./csv_bytes.ts";
import { splitQuoted } from "./csv_cells.ts";
import type { CsvTableOptions } from "./csv_dialect.ts";
import type { CsvScan } from "./csv_scanner.ts";
import { type DecimalMark, describeBadNumber } from "./numbers.ts";

// Byte values as module constants of this file: V8 folds them into the loops.
const LF = 10, CR = 13, SPACE = 32, TAB = 9, QUOTE = 34, COMMA = 44, DOT = 46;
const PLUS = 43, MINUS = 45, ZERO = 48, LOWER_E = 101, UPPER_E = 69;

const POWERS_OF_TEN = Array.from({ length: 23 }, (_, k) => 10 ** k); // exact up to 1e22
const TWO_53 = 2 ** 53;

/**
 * The number in `bytes[start, end)` written with decimal mark `mark` (the
 * byte `.` or `,`), or NaN when the cell is not such a number. The value is
 * the one `Number()` gives for the same text (with `,` read as `.`).
 *
 * @example
 * ```ts
 * import { parseNumberBytes } from "./csv_row_parser.ts";
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
 * What the last {@linkcode scanNumber} read: its value and its decimals
 * (Infinity with an exponent). A typed array, not a returned double: the scan
 * is too long for V8 to inline, and a double returned from a call is boxed,
 * one heap object per cell.
 */
const scanned = new Float64Array(2);
const VALUE = 0, DECIMALS = 1;

/**
 * Reads the longest prefix of bytes[start, limit) that the number grammar
 * accepts into `scanned` (value NaN when there is none) and returns the
 * position after it (`start` when there is none).
 */
function scanNumber(bytes: Uint8Array, start: number, limit: number, mark: number): number {
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

/** Receives parsed rows: the values of one data row, its line and (for the time column) its decimals. */
export interface RowSink {
  /** Called once per data row, in order; `values` is reused between calls. */
  row(values: Float64Array, line: number, decimals: Float64Array): void;
}

/**
 * Pass 2: splits the data rows into cells and converts them to numbers,
 * pushed chunk by chunk in order.
 */
export class CsvRowParser {
  readonly #file?: string;
  readonly #width: number;
  readonly #delimiter: number;
  readonly #quotes: boolean;
  readonly #headerLine: number;
  readonly #sink: RowSink;
  readonly #values: Float64Array;
  readonly #decimals: Float64Array;
  readonly #wantDecimals: Int8Array;
  readonly #emptyAsNaN: boolean;
  #mark: number; // decimal mark byte, or −1 until known
  #line = 1;
  #carry: Uint8Array = new Uint8Array(0);
  #bom = true;

  /**
   * `decimalsOf`: the columns whose decimals `sink` receives (default none).
   * `emptyAsNaN`: an empty cell is NaN (a result table's cell with no finite
   * value, table.ts) instead of an error; default false.
   */
  constructor(
    scan: CsvScan,
    width: number,
    sink: RowSink,
    options: CsvTableOptions & {
      decimalsOf?: readonly number[];
      emptyAsNaN?: boolean;
    } = {},
  ) {
    this.#emptyAsNaN = options.emptyAsNaN ?? false;
    this.#file = options.file;
    this.#width = width;
    this.#delimiter = scan.delimiter.charCodeAt(0);
    this.#quotes = scan.quotes;
    this.#headerLine = scan.headerLine;
    this.#sink = sink;
    this.#values = new Float64Array(width);
    this.#decimals = new Float64Array(width);
    this.#wantDecimals = new Int8Array(width);
    for (const c of options.decimalsOf ?? []) this.#wantDecimals[c] = 1;
    const decimal = options.decimal ?? "auto";
    this.#mark = decimal === "auto" ? (scan.delimiter === "," ? DOT : -1) : decimal.charCodeAt(0);
  }

  /** The decimal mark in use, once known. */
  get mark(): DecimalMark | undefined {
    return this.#mark < 0 ? undefined : String.fromCharCode(this.#mark) as DecimalMark;
  }

  /** Adds the next bytes. */
  push(chunk: Uint8Array): void {
    let bytes = chunk;
    if (this.#bom) {
      if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
        bytes = bytes.subarray(3);
      }
      if (chunk.length > 0) this.#bom = false;
    }
    if (this.#carry.length > 0 && !this.#quotes) {
      // The row split by the chunk boundary first (a small copy), then the rest in place.
      const split = bytes.indexOf(LF);
      if (split < 0) {
        this.#carry = appended(this.#carry, bytes);
        return;
      }
      const joined = concat(this.#carry, bytes.subarray(0, split + 1));
      this.#carry = new Uint8Array(0);
      this.#records(joined);
      bytes = bytes.subarray(split + 1);
    } else if (this.#carry.length > 0) {
      bytes = concat(this.#carry, bytes);
    }
    this.#carry = this.#records(bytes);
  }

  /** Every complete record of `bytes`; returns a copy of the incomplete rest. */
  #records(bytes: Uint8Array): Uint8Array {
    let start = 0;
    const n = bytes.length;
    while (start < n) {
      if (!this.#quotes && this.#mark >= 0 && this.#line > this.#headerLine) {
        // The clean row parsed where it stands, its end found by the parse itself.
        const end = this.#fastRow(bytes, start, n, this.#line);
        if (end >= 0) {
          this.#line++;
          start = end + 1;
          continue;
        }
      }
      const end = this.#quotes ? recordEnd(bytes, start) : bytes.indexOf(LF, start);
      if (end < 0) break;
      this.#record(bytes, start, end);
      start = end + 1;
    }
    return bytes.slice(start);
  }

  /** Ends pass 2 with the last row, if it has no line end. */
  end(): void {
    if (this.#carry.length > 0) {
      const rest = this.#carry;
      this.#carry = new Uint8Array(0);
      this.#record(rest, 0, rest.length);
    }
  }

  #fail(detail: string, line: number, column?: number): never {
    throw new QuiverError(detail, { file: this.#file, line, column });
  }

  /** One record: bytes[start, end), end at its LF (or the end of the data). */
  #record(bytes: Uint8Array, start: number, end: number): void {
    const line = this.#line;
    let lines = 1;
    if (this.#quotes) { for (let k = start; k < end; k++) if (bytes[k] === LF) lines++; }
    this.#line += lines;
    if (line <= this.#headerLine) return; // the header and what stands before it
    let stop = end;
    if (stop > start && bytes[stop - 1] === CR) stop--;
    if (this.#quotes && bytes.subarray(start, stop).indexOf(QUOTE) >= 0) {
      this.#quotedRecord(text(bytes, start, stop), line);
      return;
    }
    // One pass: cells are converted as they are split; the field count is judged
    // first when the row turns out wrong, as a ragged row explains a bad cell.
    const delimiter = this.#delimiter;
    const width = this.#width;
    let column = 0;
    let cellStart = start;
    let blank = true;
    let bad = -1; // column of the first bad cell
    for (let k = start; k <= stop; k++) {
      if (k < stop && bytes[k] !== delimiter) continue;
      let a = cellStart, b = k;
      while (a < b && isSpace(bytes[a])) a++;
      while (b > a && isSpace(bytes[b - 1])) b--;
      if (b > a) blank = false;
      if (column < width && bad < 0 && !this.#cell(bytes, a, b, column)) bad = column;
      column++;
      cellStart = k + 1;
    }
    if (blank) return;
    if (column !== width) this.#fail(`row has ${column} fields, the header has ${width}`, line);
    if (bad >= 0) this.#badCell(bytes, start, stop, bad, line);
    this.#sink.row(this.#values, line, this.#decimals);
  }

  /**
   * The clean row starting at `start`, in one pass: each cell a number,
   * optionally padded with spaces, between delimiters, as many as the header
   * has, then an optional CR and the LF. Returns the LF's index, or −1 for
   * anything else (a blank row, a bad cell, a wrong field count, no LF before
   * `limit`), which the general path then handles and names.
   */
  #fastRow(bytes: Uint8Array, start: number, limit: number, line: number): number {
    const delimiter = this.#delimiter;
    const mark = this.#mark;
    const width = this.#width;
    const values = this.#values;
    const wantDecimals = this.#wantDecimals;
    let k = start;
    for (let column = 0; column < width; column++) {
      while (k < limit && (bytes[k] === SPACE || (bytes[k] === TAB && delimiter !== TAB))) k++;
      const a = k;
      k = scanNumber(bytes, a, limit, mark);
      const v = scanned[VALUE];
      if (k === a || v - v !== 0) return -1;
      if (wantDecimals[column] === 1) this.#decimals[column] = scanned[DECIMALS];
      values[column] = v;
      while (k < limit && (bytes[k] === SPACE || (bytes[k] === TAB && delimiter !== TAB))) k++;
      if (column < width - 1) {
        if (k >= limit || bytes[k] !== delimiter) return -1;
        k++;
      }
    }
    if (k < limit && bytes[k] === CR) k++;
    if (k >= limit || bytes[k] !== LF) return -1;
    this.#sink.row(values, line, this.#decimals);
    return k;
  }

  /** Converts one cell into values[column]; false when it is not a finite number. */
  #cell(bytes: Uint8Array, a: number, b: number, column: number): boolean {
    if (a === b && this.#emptyAsNaN) {
      this.#values[column] = NaN;
      return true;
    }
    if (this.#mark < 0) {
      for (let k = a; k < b; k++) {
        if (bytes[k] === COMMA || bytes[k] === DOT) {
          this.#mark = bytes[k];
          break;
        }
      }
    }
    const mark = this.#mark < 0 ? DOT : this.#mark;
    const v = parseNumberBytes(bytes, a, b, mark);
    if (v - v !== 0) return false;
    this.#values[column] = v;
    // The scan that read the value counted its decimals.
    if (this.#wantDecimals[column] === 1) this.#decimals[column] = scanned[DECIMALS];
    return true;
  }

  /** Throws the message for the bad cell `column` of the row bytes[start, stop). */
  #badCell(bytes: Uint8Array, start: number, stop: number, column: number, line: number): never {
    const delimiter = String.fromCharCode(this.#delimiter);
    this.#badCellText(text(bytes, start, stop).split(delimiter)[column].trim(), column, line);
  }

  /** Throws the message for a bad cell's text at (line, column), column 0-based. */
  #badCellText(cell: string, column: number, line: number): never {
    const mark = (this.#mark < 0 ? "." : String.fromCharCode(this.#mark)) as DecimalMark;
    this.#fail(describeBadNumber(cell, mark), line, column + 1);
  }

  #quotedRecord(row: string, line: number): void {
    const cells = splitQuoted(row, String.fromCharCode(this.#delimiter)).map((c) => c.trim());
    if (cells.every((c) => c === "")) return;
    if (cells.length !== this.#width) {
      this.#fail(`row has ${cells.length} fields, the header has ${this.#width}`, line);
    }
    const encoder = new TextEncoder();
    cells.forEach((cell, column) => {
      const bytes = encoder.encode(cell);
      if (!this.#cell(bytes, 0, bytes.length, column)) this.#badCellText(cell, column, line);
    });
    this.#sink.row(this.#values, line, this.#decimals);
  }
}

/**
 * The decimal mark pass 2 will use from its first row on, when it is known
 * before: the one given, `.` with the `,` delimiter, else the first `.` or
 * `,` of the first data row (where pass 2 finds it too); undefined when the
 * first data row holds neither.
 *
 * @example
 * ```ts
 * import { firstDecimalMark } from "./csv_row_parser.ts";
 * const scan = { headerText: "a;b", headerLine: 1, rows: 1, quotes: false,
 *   delimiter: ";" as const, first: { text: "1;2,5", line: 2 } };
 * if (firstDecimalMark(scan, "auto") !== ",") throw new Error();
 * if (firstDecimalMark({ ...scan, first: { text: "1;2", line: 2 } }, "auto") !== undefined) throw new Error();
 * ```
 */
export function firstDecimalMark(
  scan: CsvScan,
  decimal: DecimalMark | "auto" | undefined,
): DecimalMark | undefined {
  if (decimal !== undefined && decimal !== "auto") return decimal;
  if (scan.delimiter === ",") return ".";
  const match = /[.,]/.exec(scan.first?.text ?? "");
  return match === null ? undefined : match[0] as DecimalMark;
}

/**
 * The error for a file whose data rows differ between the two passes: it
 * changed while it was read (a logger still writing to it, say).
 *
 * @example
 * ```ts
 * import { changedWhileRead } from "./csv_row_parser.ts";
 * if (!changedWhileRead("r.csv", 10).message.startsWith("r.csv: the file changed")) throw new Error();
 * ```
 */
export function changedWhileRead(file: string | undefined, rows: number): QuiverError {
  return new QuiverError(
    `the file changed while it was read: the first pass counted ${rows} data rows, the second found a different number (is it still being written?)`,
    { file },
  );
}
