/**
 * Pass 1 of the CSV reader ({@linkcode CsvScanner}): finds the header,
 * counts the data rows, notes the first and last data rows (for the time
 * axis), whether any cell is quoted and, when asked, where every so many
 * data rows begin; refuses what is not CSV text (NUL bytes, bytes that are
 * not UTF-8, unbalanced quotes). The bytes are pushed chunk by chunk.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import {
  appended,
  byteKinds,
  concat,
  HIGH_BYTE,
  isSpace,
  NUL_BYTE,
  QUOTE_BYTE,
  recordEnd,
  rowText,
} from "./csv_bytes.ts";
import { forcedDelimiterMismatch } from "./csv_cells.ts";
import { type CsvDelimiter, type CsvTableOptions, detectDelimiter } from "./csv_dialect.ts";

// Byte values as module constants of this file: V8 folds them into the loops.
const LF = 10, QUOTE = 34, COMMA = 44, SEMICOLON = 59;

/** What pass 1 learns of a file. */
export interface CsvScan {
  /** The header row's text (without line end). */
  readonly headerText: string;
  /** Its 1-based line. */
  readonly headerLine: number;
  /** Data rows (non-blank rows after the header). */
  readonly rows: number;
  /** The first and last data rows' text and lines; undefined without data rows. */
  readonly first?: { text: string; line: number };
  readonly last?: { text: string; line: number };
  /** Whether any quote character occurs after the header. */
  readonly quotes: boolean;
  /** The delimiter in use. */
  readonly delimiter: CsvDelimiter;
}

/**
 * Pass 1 over a CSV file's bytes, pushed chunk by chunk in order.
 */
export class CsvScanner {
  readonly #file?: string;
  readonly #delimiterOption: CsvDelimiter | "auto";
  #delimiter = -1; // byte, once the header is known
  #line = 1; // line of the next record's first byte
  #started = false;
  #pending: Uint8Array = new Uint8Array(0); // the incomplete record carried to the next chunk
  #quotes = false;
  #header?: { text: string; line: number };
  #first?: { text: string; line: number };
  #last?: { text: string; line: number };
  #rows = 0;
  #anyContent = false;
  #utf8?: TextDecoder;
  #feeds = new Int32Array(0); // line feed positions of the buffer being counted

  constructor(options: CsvTableOptions = {}) {
    this.#file = options.file;
    this.#delimiterOption = options.delimiter ?? "auto";
  }

  #fail(detail: string, line?: number): never {
    throw new QuiverError(detail, { file: this.#file, line });
  }

  /** Adds the next bytes. */
  push(chunk: Uint8Array): void {
    const kinds = byteKinds(chunk);
    if (this.#utf8 !== undefined || (kinds & HIGH_BYTE) !== 0) {
      this.#utf8 ??= new TextDecoder("utf-8", { fatal: true });
      try {
        this.#utf8.decode(chunk, { stream: true });
      } catch {
        throw notUtf8(this.#file);
      }
    }
    if ((kinds & NUL_BYTE) !== 0) {
      this.#fail("the file holds NUL bytes; it is binary, not a CSV table");
    }
    let bytes = chunk;
    if (!this.#started && bytes.length > 0) {
      this.#started = true;
      if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
        bytes = bytes.subarray(3);
      }
    }
    if (
      this.#header !== undefined && this.#first !== undefined && (kinds & QUOTE_BYTE) === 0 &&
      this.#pending.indexOf(QUOTE) < 0
    ) {
      // The row split by the chunk boundary first (a small copy), then the rest in place.
      const split = bytes.indexOf(LF);
      if (split < 0) {
        this.#pending = appended(this.#pending, bytes);
        return;
      }
      const joined = concat(this.#pending, bytes.subarray(0, split + 1));
      const rest = this.#countRows(joined);
      if (rest.length > 0) throw new Error("a row boundary was lost"); // cannot happen
      this.#pending = this.#countRows(bytes.subarray(split + 1));
      return;
    }
    const buffer = concat(this.#pending, bytes);
    const quoted = buffer.indexOf(QUOTE) >= 0;
    let pos = 0;
    let last: { start: number; end: number; line: number } | undefined;
    for (;;) {
      const end = quoted ? recordEnd(buffer, pos) : buffer.indexOf(LF, pos);
      if (end < 0) break;
      const line = this.#line;
      const kept = this.#record(buffer, pos, end, quoted);
      if (kept) last = { start: pos, end, line };
      pos = end + 1;
    }
    if (last !== undefined && this.#header !== undefined && this.#rows > 0) {
      this.#last = { text: rowText(buffer, last.start, last.end), line: last.line };
    }
    if (buffer.length - pos > 64 * 1024 * 1024) {
      this.#fail("a row longer than 64 MiB: unbalanced quotes?", this.#line);
    }
    this.#pending = buffer.slice(pos);
  }

  /**
   * The common case, after the first data row, with no quotes in sight: count
   * the rows in one loop over the bytes; a row whose first byte could start a
   * blank row is looked at whole. Returns the incomplete last row.
   */
  #countRows(buffer: Uint8Array): Uint8Array {
    const delimiter = this.#delimiter;
    const n = buffer.length;
    let rowStart = 0;
    let lastStart = -1, lastEnd = -1, lastLine = 0;
    let line = this.#line;
    let rows = 0;
    // Pass a: the line feeds' positions. Four bytes at a time: for x = word
    // XOR 0x0a0a0a0a, the expression below sets the top bit of exactly the
    // bytes of x that are zero (no borrow crosses bytes), lowest address in the
    // lowest bits on the little-endian machines Deno runs on.
    if (this.#feeds.length < n) this.#feeds = new Int32Array(n);
    const feeds = this.#feeds;
    let count = 0;
    let k = 0;
    const head = Math.min(n, (4 - (buffer.byteOffset & 3)) & 3);
    for (; k < head; k++) if (buffer[k] === LF) feeds[count++] = k;
    const words = k === n
      ? new Uint32Array(0) // shorter than the bytes before the first aligned word
      : new Uint32Array(buffer.buffer, buffer.byteOffset + k, (n - k) >> 2);
    for (let w = 0; w < words.length; w++) {
      const x = words[w] ^ 0x0a0a0a0a;
      let mask = ~(((x & 0x7f7f7f7f) + 0x7f7f7f7f) | x) & 0x80808080;
      while (mask !== 0) {
        feeds[count++] = k + (w << 2) + ((31 - Math.clz32(mask & -mask)) >> 3);
        mask &= mask - 1;
      }
    }
    for (k += words.length << 2; k < n; k++) if (buffer[k] === LF) feeds[count++] = k;
    // Pass b: the rows between them, in locals (a closure per row would keep them in a heap context).
    for (let f = 0; f < count; f++) {
      const end = feeds[f];
      const first = buffer[rowStart];
      let blank = rowStart === end || isSpace(first) || first === delimiter;
      if (blank) {
        for (let j = rowStart; j < end; j++) {
          const b = buffer[j];
          if (!(isSpace(b) || b === delimiter)) {
            blank = false;
            break;
          }
        }
      }
      if (!blank) {
        rows++;
        lastStart = rowStart;
        lastEnd = end;
        lastLine = line;
      }
      line++;
      rowStart = end + 1;
    }
    this.#rows += rows;
    this.#line = line;
    if (lastStart >= 0) {
      this.#anyContent = true;
      this.#last = { text: rowText(buffer, lastStart, lastEnd), line: lastLine };
    }
    return rowStart < n ? buffer.slice(rowStart) : new Uint8Array(0);
  }

  /** One record bytes[start, end); returns whether it is a data row. */
  #record(
    bytes: Uint8Array,
    start: number,
    end: number,
    quoted: boolean,
  ): boolean {
    const line = this.#line;
    if (quoted) { for (let k = start; k < end; k++) if (bytes[k] === LF) this.#line++; }
    this.#line++;
    const delimiter = this.#delimiter;
    let blank = true;
    for (let k = start; k < end; k++) {
      const b = bytes[k];
      if (isSpace(b) || b === LF) continue;
      this.#anyContent = true;
      if (b === delimiter || (delimiter < 0 && (b === COMMA || b === SEMICOLON))) continue;
      blank = false;
      break;
    }
    if (blank) return false;
    if (this.#header === undefined) {
      const text = rowText(bytes, start, end);
      this.#header = { text, line };
      const detected = this.#delimiterOption === "auto"
        ? detectDelimiter(text)
        : this.#delimiterOption;
      if (this.#delimiterOption !== "auto") {
        const wrong = forcedDelimiterMismatch(text, this.#delimiterOption);
        if (wrong !== undefined) throw new QuiverError(wrong, { file: this.#file, line }, "usage");
      }
      this.#delimiter = detected.charCodeAt(0);
      return false;
    }
    if (quoted && !this.#quotes && bytes.subarray(start, end).indexOf(QUOTE) >= 0) {
      this.#quotes = true;
    }
    this.#rows++;
    if (this.#first === undefined) this.#first = { text: rowText(bytes, start, end), line };
    return true;
  }

  /** Ends pass 1. @throws {QuiverError} for an empty file, no header or no data rows. */
  end(): CsvScan {
    if (this.#utf8 !== undefined) {
      try {
        this.#utf8.decode();
      } catch {
        throw notUtf8(this.#file);
      }
    }
    const rest = this.#pending;
    if (rest.length > 0) {
      let inQuote = false;
      for (let k = 0; k < rest.length; k++) if (rest[k] === QUOTE) inQuote = !inQuote;
      if (inQuote) {
        this.#fail("unbalanced quotes: a quoted field starting here never ends", this.#line);
      }
      const line = this.#line;
      if (this.#record(rest, 0, rest.length, rest.indexOf(QUOTE) >= 0) && this.#rows > 0) {
        this.#last = { text: rowText(rest, 0, rest.length), line };
      }
      this.#pending = new Uint8Array(0);
    }
    if (this.#header === undefined) {
      this.#fail(
        this.#anyContent
          ? "no header row: the file holds only blank cells"
          : "the file is empty; expected a header row and data rows",
      );
    }
    const header = this.#header as { text: string; line: number };
    if (this.#rows === 0) this.#fail("the file has a header but no data rows", header.line);
    return {
      headerText: header.text,
      headerLine: header.line,
      rows: this.#rows,
      ...(this.#first !== undefined ? { first: this.#first } : {}),
      ...(this.#last !== undefined ? { last: this.#last } : {}),
      quotes: this.#quotes,
      delimiter: String.fromCharCode(this.#delimiter) as CsvDelimiter,
    };
  }
}

/**
 * The error for bytes that are not UTF-8 text: the reader of recordings
 * answers it with the formats it reads (lib/io/formats/mod.ts).
 */
export class NotUtf8Error extends QuiverError {
  /** What to do about it, for the message that replaces this one. */
  readonly advice: string;

  /** `file`: the file, for the message. */
  constructor(file?: string) {
    const advice =
      "save a CSV as UTF-8: a header in Latin-1 or Windows-1252, e.g. with µ or °, is not UTF-8";
    super(`not UTF-8 text (${advice})`, { file });
    this.advice = advice;
  }
}

/**
 * The error for bytes that are not UTF-8 text.
 *
 * @example
 * ```ts
 * import { notUtf8 } from "./csv_scanner.ts";
 * if (!notUtf8("r.csv").message.startsWith("r.csv: not UTF-8 text")) throw new Error();
 * ```
 */
export function notUtf8(file?: string): NotUtf8Error {
  return new NotUtf8Error(file);
}
