/**
 * Reads a CSV table of numbers: one header row, then rows of numbers. Used
 * for time recordings (csv_reader.ts) and for result tables such as FRFs.
 *
 * Delimiter and decimal mark: `auto` (the default) takes `;` or a tab as the
 * delimiter when the header holds one, otherwise `,`. With `;` or tab as
 * delimiter the decimal mark is taken from the first number that has one
 * (`,` as written by many European test benches, or `.`); a file that mixes
 * the two is refused. With `,` as delimiter the mark is `.`.
 *
 * A UTF-8 byte-order mark, CRLF line ends, surrounding whitespace, quoted
 * cells and blank lines are accepted. Everything else that is not a clean
 * number table is a {@linkcode QuiverError} naming the line and column.
 *
 * @module
 */
import Papa from "papaparse";
import { QuiverError } from "../errors.ts";
import { type DecimalMark, describeBadNumber, parseDecimal } from "./numbers.ts";

/** The delimiters the reader accepts. */
export type CsvDelimiter = "," | ";" | "\t";

/** Options of {@linkcode parseNumericCsv}. */
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
 * import { parseHeaderCell } from "./csv_reader.ts";
 * const h = parseHeaderCell(" seat_rail_z [m/s^2] ");
 * if (h.name !== "seat_rail_z" || h.unit !== "m/s^2") throw new Error();
 * ```
 */
export function parseHeaderCell(cell: string): HeaderCell {
  const text = unquote(cell);
  const match = /^(.*?)\s*\[([^\]]*)\]$/.exec(text);
  if (match === null) return { name: text, unit: "" };
  return { name: match[1].trim(), unit: match[2].trim() };
}

/**
 * Trims a cell and removes quotes that surround it after whitespace (which
 * the CSV grammar does not treat as quoting, but exports write).
 */
function unquote(cell: string): string {
  const text = cell.trim();
  if (text.length >= 2 && text.startsWith('"') && text.endsWith('"')) {
    return text.slice(1, -1).replaceAll('""', '"').trim();
  }
  return text;
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

function detectDelimiter(headerLine: string): CsvDelimiter {
  if (headerLine.includes(";")) return ";";
  if (headerLine.includes("\t")) return "\t";
  return ",";
}

/** Counts decimals of a plain decimal literal, or undefined with an exponent. */
function decimalsOf(cell: string): number | undefined {
  if (/[eE]/.test(cell)) return undefined;
  const mark = cell.search(/[.,]/);
  return mark < 0 ? 0 : cell.length - mark - 1;
}

/**
 * Parses a header row and numeric data rows.
 *
 * @throws {QuiverError} for anything that is not a clean number table.
 *
 * @example
 * ```ts
 * import { parseNumericCsv } from "./csv_table.ts";
 * const t = parseNumericCsv("frequency_hz;re\n1;0,5\n2;0,25\n");
 * if (t.columns[1][1] !== 0.25 || t.header[0].name !== "frequency_hz") throw new Error();
 * ```
 */
export function parseNumericCsv(text: string, options: CsvTableOptions = {}): NumericCsv {
  const file = options.file;
  const fail = (detail: string, line?: number, column?: number): never => {
    throw new QuiverError(detail, { file, line, column });
  };
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === "") fail("the file is empty; expected a header row and data rows");
  if (body.includes("\u0000")) {
    fail("the file holds NUL bytes; it is binary, not a CSV table");
  }
  const firstLine = body.slice(0, body.search(/\r?\n|$/));
  const delimiter = options.delimiter === undefined || options.delimiter === "auto"
    ? detectDelimiter(firstLine)
    : options.delimiter;
  const parsed = Papa.parse<string[]>(body, {
    delimiter,
    header: false,
    skipEmptyLines: false,
    quoteChar: '"',
  });
  const rows = parsed.data;
  // 1-based line on which each row starts (quoted cells may span lines).
  const lineOf: number[] = [];
  let line = 1;
  for (const row of rows) {
    lineOf.push(line);
    line += 1;
    for (const cell of row) line += (cell.match(/\n/g) ?? []).length;
  }
  const quoteError = parsed.errors.find((e) => e.type === "Quotes");
  if (quoteError !== undefined) {
    fail(`unbalanced quotes: ${quoteError.message}`, lineOf[quoteError.row ?? 0]);
  }
  const isBlank = (row: string[]) => row.every((cell) => cell.trim() === "");
  const headerIndex = rows.findIndex((row) => !isBlank(row));
  if (headerIndex < 0) fail("no header row: the file holds only blank cells");
  const header = rows[headerIndex].map(parseHeaderCell);
  const headerLine = lineOf[headerIndex];

  const seen = new Map<string, number>();
  header.forEach((cell, i) => {
    if (cell.name === "") fail("empty column name in the header", headerLine, i + 1);
    const previous = seen.get(cell.name);
    if (previous !== undefined) {
      fail(`duplicate column name "${cell.name}" (also column ${previous + 1})`, headerLine, i + 1);
    }
    seen.set(cell.name, i);
  });

  const dataRows: number[] = [];
  for (let r = headerIndex + 1; r < rows.length; r++) {
    if (isBlank(rows[r])) continue;
    if (rows[r].length !== header.length) {
      fail(
        `row has ${rows[r].length} fields, the header has ${header.length}`,
        lineOf[r],
      );
    }
    dataRows.push(r);
  }
  if (dataRows.length === 0) {
    fail("the file has a header but no data rows", headerLine);
  }

  let mark: DecimalMark | undefined = options.decimal === "auto" ? undefined : options.decimal;
  if (mark === undefined && delimiter === ",") mark = ".";
  const columns = header.map(() => new Float64Array(dataRows.length));
  const decimals = header.map(() => 0);
  for (let i = 0; i < dataRows.length; i++) {
    const r = dataRows[i];
    const row = rows[r];
    for (let c = 0; c < row.length; c++) {
      const cell = unquote(row[c]);
      if (mark === undefined) {
        if (cell.includes(",")) mark = ",";
        else if (cell.includes(".")) mark = ".";
      }
      const value = parseDecimal(cell, mark ?? ".");
      if (value === undefined || !Number.isFinite(value)) {
        fail(describeBadNumber(cell, mark ?? "."), lineOf[r], c + 1);
      }
      columns[c][i] = value as number;
      decimals[c] = Math.max(decimals[c], decimalsOf(cell) ?? Infinity);
    }
  }
  return { header, columns, lines: dataRows.map((r) => lineOf[r]), headerLine, decimals };
}
