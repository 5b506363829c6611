/**
 * The one CSV reader of quiver: bytes in, numbers out, in two passes that
 * each take the file chunk by chunk.
 *
 * - Pass 1 ({@linkcode CsvScanner}) finds the header, counts the data rows,
 *   notes the first and last data rows (for the time axis), whether any cell
 *   is quoted, and refuses what is not CSV text (NUL bytes, bytes that are not
 *   UTF-8, unbalanced quotes).
 * - Pass 2 ({@linkcode CsvRowParser}) splits rows into cells and turns each
 *   cell into a number straight from its bytes, with no string per cell.
 *
 * A whole file in memory and a file read from disk go through the same two
 * classes (push the bytes, then end), so the rules exist once: delimiter and
 * decimal mark (`auto` takes `;` or a tab as delimiter when the header holds
 * one; with `;` or tab the decimal mark comes from the first number that has
 * one), a UTF-8 byte-order mark, CRLF, surrounding whitespace, quoted cells
 * and blank lines. A fault is a {@linkcode QuiverError} naming the line and
 * column; faults are reported in file order.
 *
 * Numbers: a cell must match `[+-]digits[.digits][e[+-]digits]` (with the
 * file's decimal mark). Short decimals, whose digits form an integer below
 * 2^53 and whose power of ten is within ±22, are converted exactly by one correctly rounded
 * multiplication or division (Clinger 1990, "How to read floating point
 * numbers accurately"); every other cell goes to `Number()`. Either way the
 * value is the one `Number(text)` gives.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { type DecimalMark, describeBadNumber } from "./numbers.ts";

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

/** The name and unit parsed from a header cell. */
export interface HeaderCell {
  /** Channel name. */
  readonly name: string;
  /** Unit from the brackets, "" when there are none. */
  readonly unit: string;
}

/**
 * Splits `name [unit]` into its parts.
 *
 * @example
 * ```ts
 * import { parseHeaderCell } from "./csv_engine.ts";
 * const h = parseHeaderCell(" seat_rail_z [m/s^2] ");
 * if (h.name !== "seat_rail_z" || h.unit !== "m/s^2") throw new Error();
 * const b = parseHeaderCell("a[1 [m/s^2]");
 * if (b.name !== "a[1" || b.unit !== "m/s^2") throw new Error();
 * ```
 */
export function parseHeaderCell(cell: string): HeaderCell {
  const text = unquote(cell);
  // The unit is the last bracketed group at the end: a `[` before it belongs to the name.
  const match = /^(.*?)\s*\[([^[\]]*)\]$/.exec(text);
  if (match === null) return { name: text, unit: "" };
  return { name: match[1].trim(), unit: match[2].trim() };
}

/** Trims a cell and removes quotes around it (also after whitespace, as exports write). */
function unquote(cell: string): string {
  const text = cell.trim();
  if (text.length >= 2 && text.startsWith('"') && text.endsWith('"')) {
    return text.slice(1, -1).replaceAll('""', '"').trim();
  }
  return text;
}

const LF = 10, CR = 13, SPACE = 32, TAB = 9, QUOTE = 34, COMMA = 44, SEMICOLON = 59, DOT = 46;
const PLUS = 43, MINUS = 45, ZERO = 48, LOWER_E = 101, UPPER_E = 69;
const POWERS_OF_TEN = Array.from({ length: 23 }, (_, k) => 10 ** k); // exact up to 1e22
const TWO_53 = 2 ** 53;

const isSpace = (b: number) => b === SPACE || b === TAB || b === CR;

/**
 * The number in `bytes[start, end)` written with decimal mark `mark` (the
 * byte `.` or `,`), or NaN when the cell is not such a number. The value is
 * the one `Number()` gives for the same text (with `,` read as `.`).
 *
 * @example
 * ```ts
 * import { parseNumberBytes } from "./csv_engine.ts";
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
const text = (bytes: Uint8Array, start: number, end: number) =>
  decoder.decode(bytes.subarray(start, end));

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
  /**
   * Where data rows `every`, 2·`every`, … begin: byte offset in the file and
   * line, so that pass 2 can start there (csv_parallel.ts). Present when the
   * scanner was asked for them.
   */
  readonly checkpoints?: CsvCheckpoints;
}

/** Byte offsets and lines of every `every`-th data row, from data row `every` on (0-based). */
export interface CsvCheckpoints {
  readonly every: number;
  readonly offsets: readonly number[];
  readonly lines: readonly number[];
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
  #pushed = 0; // bytes pushed before the current chunk
  readonly #every: number;
  #nextCheckpoint: number; // the data row (0-based) whose start is noted next
  readonly #offsets: number[] = [];
  readonly #lines: number[] = [];
  #feeds = new Int32Array(0); // line feed positions of the buffer being counted

  /**
   * `checkpointEvery`: note where every so many data rows begin
   * ({@linkcode CsvScan.checkpoints}). Default: none.
   */
  constructor(options: CsvTableOptions & { checkpointEvery?: number } = {}) {
    this.#file = options.file;
    this.#delimiterOption = options.delimiter ?? "auto";
    const every = options.checkpointEvery ?? Infinity;
    if (!(every >= 1)) throw new RangeError(`checkpointEvery must be ≥ 1, got ${every}`);
    this.#every = every;
    this.#nextCheckpoint = every;
  }

  /** Notes data row `index` (0-based), starting at file offset `offset` on `line`. */
  #checkpoint(index: number, offset: number, line: number): void {
    if (index !== this.#nextCheckpoint) return;
    this.#offsets.push(offset);
    this.#lines.push(line);
    this.#nextCheckpoint += this.#every;
  }

  #fail(detail: string, line?: number): never {
    throw new QuiverError(detail, { file: this.#file, line });
  }

  /** Adds the next bytes. */
  push(chunk: Uint8Array): void {
    let base = this.#pushed; // file offset of bytes[0]
    this.#pushed += chunk.length;
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
        base += 3;
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
      const rest = this.#countRows(joined, base - this.#pending.length);
      if (rest.length > 0) throw new Error("a row boundary was lost"); // cannot happen
      this.#pending = this.#countRows(bytes.subarray(split + 1), base + split + 1);
      return;
    }
    const offset = base - this.#pending.length; // of buffer[0]
    const buffer = concat(this.#pending, bytes);
    const quoted = buffer.indexOf(QUOTE) >= 0;
    let pos = 0;
    let last: { start: number; end: number; line: number } | undefined;
    for (;;) {
      const end = quoted ? recordEnd(buffer, pos) : buffer.indexOf(LF, pos);
      if (end < 0) break;
      const line = this.#line;
      const kept = this.#record(buffer, pos, end, quoted, offset);
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
   * blank row is looked at whole. Returns the incomplete last row. `offset`:
   * the file offset of buffer[0].
   */
  #countRows(buffer: Uint8Array, offset: number): Uint8Array {
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
    let nextCheckpoint = this.#nextCheckpoint - this.#rows; // in rows of this buffer
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
        if (rows === nextCheckpoint) {
          this.#checkpoint(this.#rows + rows, offset + rowStart, line);
          nextCheckpoint = this.#nextCheckpoint - this.#rows;
        }
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

  /** One record bytes[start, end), bytes[0] at file offset `offset`; returns whether it is a data row. */
  #record(
    bytes: Uint8Array,
    start: number,
    end: number,
    quoted: boolean,
    offset: number,
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
    this.#checkpoint(this.#rows, offset + start, line);
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
      const offset = this.#pushed - rest.length;
      if (
        this.#record(rest, 0, rest.length, rest.indexOf(QUOTE) >= 0, offset) && this.#rows > 0
      ) {
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
      ...(Number.isFinite(this.#every)
        ? { checkpoints: { every: this.#every, offsets: this.#offsets, lines: this.#lines } }
        : {}),
    };
  }
}

/** A row's text without its line end. */
function rowText(bytes: Uint8Array, start: number, end: number): string {
  return decoder.decode(
    bytes.subarray(start, end > start && bytes[end - 1] === CR ? end - 1 : end),
  );
}

/**
 * `kept` then `more` in a new array: for bytes kept past this push, as the
 * reader refills the buffer `more` lies in.
 */
function appended(kept: Uint8Array, more: Uint8Array): Uint8Array {
  const out = new Uint8Array(kept.length + more.length);
  out.set(kept);
  out.set(more, kept.length);
  return out;
}

/** `a` then `b`, copying only when `a` holds anything (for bytes used within this push). */
function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  if (a.length === 0) return b;
  const out = new Uint8Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  return out;
}

const HIGH_BYTE = 1, NUL_BYTE = 2, QUOTE_BYTE = 4;

/**
 * Which of a byte ≥ 0x80, a NUL and a quote occur in `bytes`, as flags, in
 * one pass: four bytes at a time where the chunk is aligned (a file chunk
 * always is), with the classic "has a zero byte" word test.
 */
function byteKinds(bytes: Uint8Array): number {
  let high = 0, nul = 0, quote = 0;
  let k = 0;
  if (bytes.byteOffset % 4 === 0) {
    const words = new Uint32Array(bytes.buffer, bytes.byteOffset, bytes.length >> 2);
    for (let w = 0; w < words.length; w++) {
      const word = words[w];
      const quoted = word ^ 0x22222222;
      high |= word;
      nul |= (word - 0x01010101) & ~word;
      quote |= (quoted - 0x01010101) & ~quoted;
    }
    k = words.length << 2;
  }
  // (w − 0x01010101) & ~w & 0x80808080 is non-zero exactly when a byte of w is
  // zero (a borrow can only mark bytes above a zero byte), so the OR over all
  // words, masked once, answers for the chunk.
  let kinds = ((high & 0x80808080) !== 0 ? HIGH_BYTE : 0) |
    ((nul & 0x80808080) !== 0 ? NUL_BYTE : 0) |
    ((quote & 0x80808080) !== 0 ? QUOTE_BYTE : 0);
  for (; k < bytes.length; k++) {
    const b = bytes[k];
    if (b >= 0x80) kinds |= HIGH_BYTE;
    else if (b === 0) kinds |= NUL_BYTE;
    else if (b === QUOTE) kinds |= QUOTE_BYTE;
  }
  return kinds;
}

/** The delimiters by the names the command line gives them (`--delimiter`). */
const DELIMITER_NAMES: Record<CsvDelimiter, string> = {
  ",": "comma",
  ";": "semicolon",
  "\t": "tab",
};

/**
 * The message for a delimiter that was given (not found) and leaves the
 * header one column although the delimiter the header suggests splits it;
 * undefined when the given delimiter is plausible.
 *
 * @example
 * ```ts
 * import { forcedDelimiterMismatch } from "./csv_engine.ts";
 * const m = forcedDelimiterMismatch("time_s,a [g],b [g]", ";");
 * if (m !== "the file has one column with the delimiter semicolon; its header suggests comma (3 columns): give --delimiter comma, or auto") throw new Error(m);
 * if (forcedDelimiterMismatch("a [g]", ";") !== undefined) throw new Error();
 * ```
 */
export function forcedDelimiterMismatch(
  headerText: string,
  given: CsvDelimiter,
): string | undefined {
  if (splitQuoted(headerText, given).length !== 1) return undefined;
  const suggested = detectDelimiter(headerText);
  const columns = splitQuoted(headerText, suggested).length;
  if (suggested === given || columns < 2) return undefined;
  const name = DELIMITER_NAMES[suggested];
  return `the file has one column with the delimiter ${DELIMITER_NAMES[given]}; ` +
    `its header suggests ${name} (${columns} columns): give --delimiter ${name}, or auto`;
}

function detectDelimiter(headerLine: string): CsvDelimiter {
  if (headerLine.includes(";")) return ";";
  if (headerLine.includes("\t")) return "\t";
  return ",";
}

/**
 * The error for a file whose data rows differ between the two passes: it
 * changed while it was read (a logger still writing to it, say).
 *
 * @example
 * ```ts
 * import { changedWhileRead } from "./csv_engine.ts";
 * if (!changedWhileRead("r.csv", 10).message.startsWith("r.csv: the file changed")) throw new Error();
 * ```
 */
export function changedWhileRead(file: string | undefined, rows: number): QuiverError {
  return new QuiverError(
    `the file changed while it was read: the first pass counted ${rows} data rows, the second found a different number (is it still being written?)`,
    { file },
  );
}

/** The error for bytes that are not UTF-8 text. */
export function notUtf8(file?: string): QuiverError {
  return new QuiverError(
    "neither a WAV file nor UTF-8 text; quiver reads CSV and WAV recordings (save a CSV as UTF-8: a header in Latin-1 or Windows-1252, e.g. with µ or °, is not UTF-8)",
    { file },
  );
}

/**
 * Splits a header row into cells (respecting quotes) and checks the names.
 *
 * @throws {QuiverError} for an empty or repeated name.
 */
export function parseHeaderRow(
  headerText: string,
  delimiter: CsvDelimiter,
  line: number,
  file?: string,
): HeaderCell[] {
  const header = splitQuoted(headerText, delimiter).map(parseHeaderCell);
  const seen = new Map<string, number>();
  header.forEach((cell, i) => {
    if (cell.name === "") {
      throw new QuiverError("empty column name in the header", { file, line, column: i + 1 });
    }
    const previous = seen.get(cell.name);
    if (previous !== undefined) {
      throw new QuiverError(
        `duplicate column name "${cell.name}" (also column ${previous + 1})`,
        { file, line, column: i + 1 },
      );
    }
    seen.set(cell.name, i);
  });
  return header;
}

/** Splits one row (which may hold quoted cells) into raw cells, RFC 4180 style. */
function splitQuoted(row: string, delimiter: string): string[] {
  const cells: string[] = [];
  let cell = "";
  let inQuote = false;
  for (let i = 0; i < row.length; i++) {
    const c = row[i];
    if (inQuote) {
      if (c === '"') {
        if (row[i + 1] === '"') {
          cell += '"';
          i++;
        } else inQuote = false;
      } else cell += c;
    } else if (c === '"' && cell.trim() === "") {
      cell = "";
      inQuote = true;
    } else if (c === delimiter) {
      cells.push(cell);
      cell = "";
    } else cell += c;
  }
  cells.push(cell);
  return cells;
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

/** The LF that ends the record starting at `start`, outside quotes; −1 when not in `bytes`. */
function recordEnd(bytes: Uint8Array, start: number): number {
  let inQuote = false;
  for (let k = start; k < bytes.length; k++) {
    const b = bytes[k];
    if (b === QUOTE) inQuote = !inQuote;
    else if (b === LF && !inQuote) return k;
  }
  return -1;
}

/**
 * The text of cell `column` of a data row (quotes and surrounding whitespace
 * removed), for the rows pass 1 keeps.
 */
export function cellOfRow(row: string, delimiter: CsvDelimiter, column: number): string {
  return unquote(splitQuoted(row, delimiter)[column] ?? "");
}

/**
 * The decimal mark pass 2 will use from its first row on, when it is known
 * before: the one given, `.` with the `,` delimiter, else the first `.` or
 * `,` of the first data row (where pass 2 finds it too); undefined when the
 * first data row holds neither.
 *
 * @example
 * ```ts
 * import { firstDecimalMark } from "./csv_engine.ts";
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

/** The decimal mark the first cell of `row` holding `.` or `,` shows, if any. */
export function markOfRow(row: string, delimiter: CsvDelimiter): DecimalMark | undefined {
  for (const cell of splitQuoted(row, delimiter)) {
    if (cell.includes(",")) return ",";
    if (cell.includes(".")) return ".";
  }
  return undefined;
}

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
