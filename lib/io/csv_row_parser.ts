/**
 * Pass 2 of the CSV reader ({@linkcode CsvRowParser}): splits the data rows
 * into cells and turns each cell into a number straight from its bytes
 * (csv_number_bytes.ts), with no string per cell; the bytes are pushed chunk
 * by chunk, from the file's start or from a checkpoint of pass 1.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { appended, concat, isSpace, recordEnd, text } from "./csv_bytes.ts";
import { splitQuoted } from "./csv_cells.ts";
import type { CsvTableOptions } from "./csv_dialect.ts";
import { DECIMALS, parseNumberBytes, scanned, scanNumber, VALUE } from "./csv_number_bytes.ts";
import type { CsvScan } from "./csv_scanner.ts";
import { type DecimalMark, describeBadNumber } from "./numbers.ts";

// Byte values as module constants of this file: V8 folds them into the loops.
const LF = 10, CR = 13, SPACE = 32, TAB = 9, QUOTE = 34, COMMA = 44, DOT = 46;

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
   * `startLine`: the bytes begin at a data row on this line (a checkpoint of
   * {@linkcode CsvScan.checkpoints}), not at the file's start; default: they
   * begin at the file's start.
   * `emptyAsNaN`: an empty cell is NaN (a result table's cell with no finite
   * value, table.ts) instead of an error; default false.
   */
  constructor(
    scan: CsvScan,
    width: number,
    sink: RowSink,
    options: CsvTableOptions & {
      decimalsOf?: readonly number[];
      startLine?: number;
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
    if (options.startLine !== undefined) {
      if (!(options.startLine > scan.headerLine)) {
        throw new RangeError(`startLine ${options.startLine} is not after the header`);
      }
      this.#line = options.startLine;
      this.#bom = false;
    }
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
