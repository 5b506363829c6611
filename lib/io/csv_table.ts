/**
 * Small CSV tables held in memory: result tables and FRF files (numbers),
 * mode shapes, point and degree-of-freedom maps and geometry (text). They
 * are split by papaparse, a well-kept library, with its dialect detection;
 * recordings, where speed rules, go through the byte-level reader
 * (csv_engine.ts) instead.
 *
 * The dialect: the delimiter is the one given, else the one of `;`, tab
 * and `,` that papaparse finds splitting the first rows into equal counts
 * of at least two cells, else `;` or a tab when the header holds one, else
 * `,`. Quotes as RFC 4180 writes them (`"a,b"`, `""` for a quote), a UTF-8
 * byte-order mark, CRLF and blank rows are accepted. Faults name the file
 * and the line (and column) as the file shows them, not papaparse's row
 * index.
 *
 * @module
 */
// @ts-types="npm:@types/papaparse@5.5.2"
import Papa from "npm:papaparse@5.7.1";
import { QuiverError } from "../errors.ts";
import {
  type CsvDelimiter,
  type CsvTableOptions,
  forcedDelimiterMismatch,
  type HeaderCell,
  parseHeaderCell,
  parseHeaderRow,
} from "./csv_engine.ts";
import { checkName } from "./names.ts";
import { type DecimalMark, describeBadNumber, parseDecimal } from "./numbers.ts";
import { restoreFormula } from "./table.ts";

export { type CsvDelimiter, type CsvTableOptions, type HeaderCell, parseHeaderCell };

/** The rows of a small CSV table as text, before any reading of cells. */
export interface CsvRows {
  /** The header's raw cells (quotes removed by the split). */
  readonly header: readonly string[];
  /** Its 1-based line. */
  readonly headerLine: number;
  /** The data rows' raw cells; rows whose every cell is blank are left out. */
  readonly rows: readonly (readonly string[])[];
  /** 1-based line on which each data row begins. */
  readonly lines: readonly number[];
  /** The delimiter in use. */
  readonly delimiter: CsvDelimiter;
}

/** The delimiters tried, in the order that wins a tie (a `;` file may hold `,` as decimal mark). */
const DELIMITERS: CsvDelimiter[] = [";", "\t", ","];

/**
 * Splits a small CSV text into its header and data rows with papaparse.
 * Returns undefined for a text without a non-blank row.
 *
 * @throws {QuiverError} for NUL bytes, unbalanced quotes or a given
 * delimiter that leaves the header one column where another splits it.
 *
 * @example
 * ```ts
 * import { splitCsvRows } from "./csv_table.ts";
 * const t = splitCsvRows('\uFEFF"f, [Hz]";x\r\n\r\n1;2,5\r\n')!;
 * if (t.delimiter !== ";" || t.header[0] !== "f, [Hz]" || t.rows[0][1] !== "2,5") throw new Error();
 * if (t.lines[0] !== 3) throw new Error();
 * ```
 */
export function splitCsvRows(
  text: string,
  options: { file?: string; delimiter?: CsvDelimiter | "auto" } = {},
): CsvRows | undefined {
  const file = options.file;
  if (text.includes("\0")) {
    throw new QuiverError("the file holds NUL bytes; it is binary, not a CSV table", { file });
  }
  const body = text.startsWith("\uFEFF") ? text.slice(1) : text;
  const given = options.delimiter ?? "auto";
  const delimiter = given !== "auto" ? given : guessDelimiter(body);
  const parsed = Papa.parse<string[]>(body, { delimiter, skipEmptyLines: false });
  const linebreak = parsed.meta.linebreak === "\r" ? "\r" : "\n";
  // papaparse counts records; the file's lines are counted here, from the
  // line breaks each record holds inside quotes, since every record (blank
  // ones included) follows the previous one's line break.
  const lines: number[] = [];
  let line = 1;
  for (const record of parsed.data) {
    lines.push(line);
    line += 1;
    for (const cell of record) line += cell.split(linebreak).length - 1;
  }
  const unbalanced = parsed.errors.find((e) => e.code === "MissingQuotes");
  if (unbalanced !== undefined) {
    throw new QuiverError("unbalanced quotes: a quoted field starting here never ends", {
      file,
      line: lines[unbalanced.row ?? 0],
    });
  }
  const kept = parsed.data.flatMap((cells, r) =>
    cells.every((c) => c.trim() === "") ? [] : [{ cells, line: lines[r] }]
  );
  if (kept.length === 0) return undefined;
  const [head, ...data] = kept;
  if (given !== "auto") {
    const wrong = forcedDelimiterMismatch(
      head.cells.map(quoteIfNeeded(given)).join(given),
      given,
    );
    if (wrong !== undefined) throw new QuiverError(wrong, { file, line: head.line }, "usage");
  }
  return {
    header: head.cells,
    headerLine: head.line,
    rows: data.map((d) => d.cells),
    lines: data.map((d) => d.line),
    delimiter,
  };
}

/** A raw cell written back as it stood, for the forced-delimiter check. */
const quoteIfNeeded = (delimiter: string) => (cell: string) =>
  cell.includes(delimiter) || cell.includes('"') ? `"${cell.replaceAll('"', '""')}"` : cell;

/** papaparse's guess among {@linkcode DELIMITERS}, or the header's hint when it cannot tell. */
function guessDelimiter(body: string): CsvDelimiter {
  const guess = Papa.parse<string[]>(body, {
    preview: 10,
    skipEmptyLines: "greedy",
    delimitersToGuess: DELIMITERS,
  });
  if (!guess.errors.some((e) => e.code === "UndetectableDelimiter")) {
    return guess.meta.delimiter as CsvDelimiter;
  }
  const header = body.split(/\r?\n/).find((l) => l.trim() !== "") ?? "";
  return header.includes(";") ? ";" : header.includes("\t") ? "\t" : ",";
}

/** A parsed numeric CSV table with the positions needed for messages. */
export interface NumericCsv {
  /** Header cells, one per column. */
  readonly header: readonly HeaderCell[];
  /** Values per column. */
  readonly columns: readonly Float64Array[];
  /** 1-based line of each data row. */
  readonly lines: readonly number[];
  /** 1-based line of the header. */
  readonly headerLine: number;
  /** Most decimals written in each column (Infinity where exponents were used). */
  readonly decimals: readonly number[];
}

/** The header names as quiver wrote them, checked. */
function headerCells(cells: readonly HeaderCell[], line: number, file?: string): HeaderCell[] {
  return cells.map((cell, i) => {
    const where = { file, line, column: i + 1 };
    checkName(cell.name, `column ${i + 1}`, where);
    checkName(cell.unit, `the unit of column ${i + 1}`, where);
    return { name: restoreFormula(cell.name), unit: cell.unit };
  });
}

/**
 * Parses a header row and numeric data rows. Column names come back as
 * quiver wrote them: the spreadsheet guard of a formula-like name (`'-x`,
 * table.ts) is undone. With `emptyCells`, an empty cell reads as NaN (a
 * value quiver's writer could not give as a finite number); without, it is
 * refused, naming file, line and column: a missing cell is never read as 0.
 *
 * Numbers follow the grammar of numbers.ts. The decimal mark is the one
 * given, else `.` when the delimiter is `,` (a comma there separates cells,
 * so it cannot also be the decimal mark), else the first `.` or `,` written
 * in a data cell, as spreadsheets in many locales export `;`-delimited
 * tables with decimal commas.
 *
 * @throws {QuiverError} for anything that is not a clean number table, or a
 * name holding a control, bidirectional or zero-width character (names.ts).
 *
 * @example
 * ```ts
 * import { parseNumericCsv } from "./csv_table.ts";
 * const t = parseNumericCsv("frequency_hz;re\n1;0,5\n2;0,25\n");
 * if (t.columns[1][1] !== 0.25 || t.header[0].name !== "frequency_hz") throw new Error();
 * ```
 */
export function parseNumericCsv(
  text: string,
  options: CsvTableOptions & { emptyCells?: boolean } = {},
): NumericCsv {
  const file = options.file;
  const split = splitCsvRows(text, options);
  if (split === undefined) {
    throw new QuiverError(
      text.trim() === "" ? "the file is empty; expected a header row and data rows" : (
        "no header row: the file holds only blank cells"
      ),
      { file },
    );
  }
  const headerText = split.header.map(quoteIfNeeded(split.delimiter)).join(split.delimiter);
  const header = headerCells(
    parseHeaderRow(headerText, split.delimiter, split.headerLine, file),
    split.headerLine,
    file,
  );
  if (split.rows.length === 0) {
    throw new QuiverError("the file has a header but no data rows", {
      file,
      line: split.headerLine,
    });
  }
  const width = header.length;
  let mark: DecimalMark | undefined = options.decimal !== undefined && options.decimal !== "auto"
    ? options.decimal
    : split.delimiter === ","
    ? "."
    : undefined;
  const columns = header.map(() => new Float64Array(split.rows.length));
  const decimals = header.map(() => 0);
  split.rows.forEach((cells, r) => {
    const line = split.lines[r];
    if (cells.length !== width) {
      throw new QuiverError(`row has ${cells.length} fields, the header has ${width}`, {
        file,
        line,
      });
    }
    cells.forEach((raw, c) => {
      const cell = raw.trim();
      if (cell === "" && options.emptyCells === true) {
        columns[c][r] = NaN;
        return;
      }
      mark ??= cell.includes(",") || cell.includes(".") ? markOf(cell) : undefined;
      const value = parseDecimal(cell, mark ?? ".");
      if (value === undefined || !Number.isFinite(value)) {
        throw new QuiverError(describeBadNumber(cell, mark ?? "."), { file, line, column: c + 1 });
      }
      columns[c][r] = value;
      const written = writtenDecimals(cell, mark ?? ".");
      if (written > decimals[c]) decimals[c] = written;
    });
  });
  return { header, columns, lines: split.lines, headerLine: split.headerLine, decimals };
}

/** The first decimal mark written in a cell. */
function markOf(cell: string): DecimalMark {
  const comma = cell.indexOf(","), dot = cell.indexOf(".");
  return comma >= 0 && (dot < 0 || comma < dot) ? "," : ".";
}

/** Digits after the decimal mark; Infinity with an exponent. */
function writtenDecimals(cell: string, mark: DecimalMark): number {
  if (/[eE]/.test(cell)) return Infinity;
  const at = cell.indexOf(mark);
  return at < 0 ? 0 : cell.length - at - 1;
}

/** A text table with the line of each row, for messages. */
export interface TextCsv {
  /** Header cells. */
  readonly header: readonly HeaderCell[];
  /** Rows of trimmed cells, as many as the header has. */
  readonly rows: readonly (readonly string[])[];
  /** 1-based file line of each row. */
  readonly lines: readonly number[];
  /** The delimiter in use. */
  readonly delimiter: CsvDelimiter;
}

/**
 * The number in a cell of a text table, or undefined when it holds none
 * (numbers.ts grammar; never "" as 0). A `,` is a decimal mark only when
 * the delimiter is not a comma: in a comma-delimited table it separates
 * cells, and a quoted "1,5" there is more likely a pair than a number.
 *
 * @example
 * ```ts
 * import { numberOfTextCell } from "./csv_table.ts";
 * if (numberOfTextCell("0,25", ";") !== 0.25 || numberOfTextCell("0,25", ",") !== undefined) throw new Error();
 * if (numberOfTextCell("", ";") !== undefined) throw new Error();
 * ```
 */
export function numberOfTextCell(cell: string, delimiter: CsvDelimiter): number | undefined {
  const value = parseDecimal(cell, ".") ??
    (delimiter !== "," ? parseDecimal(cell, ",") : undefined);
  return value !== undefined && Number.isFinite(value) ? value : undefined;
}

/**
 * Parses a text CSV table (mode shapes, point and degree-of-freedom maps,
 * geometry). Cells and names come back as quiver wrote them: the
 * spreadsheet guard of formula-like text (`'+z`, table.ts) is undone, so a
 * shapes file `modal` wrote reads back with its `+z` directions.
 *
 * @throws {QuiverError} for a table without a header, a row whose cell
 * count differs from the header's (naming file and line), or a name or cell
 * holding a control, bidirectional or zero-width character (names.ts).
 *
 * @example
 * ```ts
 * import { parseTextCsv } from "./csv_table.ts";
 * const t = parseTextCsv('\uFEFFmode,point,direction,value [m]\r\n1,"12",+z,0.5\n');
 * if (t.header[3].unit !== "m" || t.rows[0][2] !== "+z" || t.lines[0] !== 2) throw new Error();
 * if (parseTextCsv("point,direction\n1,'-x\n").rows[0][1] !== "-x") throw new Error();
 * ```
 */
export function parseTextCsv(text: string, options: { file?: string } = {}): TextCsv {
  const file = options.file;
  const split = splitCsvRows(text, { file });
  if (split === undefined) throw new QuiverError("the table is empty", { file });
  const header = headerCells(split.header.map(parseHeaderCell), split.headerLine, file);
  const rows = split.rows.map((cells, r) => {
    const line = split.lines[r];
    if (cells.length !== header.length) {
      throw new QuiverError(`row has ${cells.length} fields, the header has ${header.length}`, {
        file,
        line,
      });
    }
    return cells.map((c, i) => {
      const cell = c.trim();
      checkName(cell, `column ${i + 1}`, { file, line, column: i + 1 });
      return restoreFormula(cell);
    });
  });
  return { header, rows, lines: split.lines, delimiter: split.delimiter };
}
