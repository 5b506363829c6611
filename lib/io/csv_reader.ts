/**
 * Reads a time-history CSV into a {@linkcode Recording}.
 *
 * Layout: one header row, then one row per sample. A column named `time_s`
 * or `time` (any case, unit `s` if one is given) is the time axis; every
 * other column is a channel. A header cell may carry the unit in brackets:
 * `seat_rail_z [m/s^2]`. Without a time column the rate must be given.
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
import type { Channel, Recording } from "./recording.ts";
import { type DecimalMark, describeBadNumber, parseDecimal } from "./numbers.ts";

/** The delimiters the reader accepts. */
export type CsvDelimiter = "," | ";" | "\t";

/** Options of {@linkcode parseCsvRecording}. */
export interface CsvReadOptions {
  /** File name used in error messages. Default: none. */
  file?: string;
  /**
   * Sample rate in Hz. Required when there is no time column; when there is
   * one, it must agree with the column within 0.1 % and is then used as the
   * exact rate. Default: derived from the time column.
   */
  rate?: number;
  /** Field delimiter. Default `"auto"`. */
  delimiter?: CsvDelimiter | "auto";
  /** Decimal mark. Default `"auto"` (see the module notes). */
  decimal?: DecimalMark | "auto";
  /**
   * Largest allowed deviation of one time step from the mean step, as a
   * fraction of the mean step. Default 0.01 (1 %).
   */
  timeTolerance?: number;
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

const TIME_NAMES = new Set(["time_s", "time"]);

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
 * Parses CSV text into a recording.
 *
 * @throws {QuiverError} for anything that is not a clean number table.
 *
 * @example
 * ```ts
 * import { parseCsvRecording } from "./csv_reader.ts";
 * const rec = parseCsvRecording("time_s;mic [Pa]\n0;0,5\n0,001;-0,25\n0,002;0\n");
 * if (rec.rate !== 1000 || rec.channels[0].data[1] !== -0.25) throw new Error();
 * ```
 */
export function parseCsvRecording(
  text: string,
  options: CsvReadOptions = {},
): Recording {
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
  const header = rows[headerIndex].map(parseHeaderCell);
  const headerLine = lineOf[headerIndex];

  let timeColumn = -1;
  const seen = new Map<string, number>();
  header.forEach((cell, i) => {
    if (cell.name === "") fail("empty column name in the header", headerLine, i + 1);
    if (TIME_NAMES.has(cell.name.toLowerCase())) {
      if (timeColumn >= 0) {
        fail(
          `two time columns ("${header[timeColumn].name}" in column ${
            timeColumn + 1
          } and "${cell.name}")`,
          headerLine,
          i + 1,
        );
      }
      if (cell.unit !== "" && cell.unit !== "s") {
        fail(
          `time column "${cell.name}" is in [${cell.unit}]; quiver expects seconds [s]`,
          headerLine,
          i + 1,
        );
      }
      timeColumn = i;
    }
    const previous = seen.get(cell.name);
    if (previous !== undefined) {
      fail(
        `duplicate channel name "${cell.name}" (also column ${previous + 1})`,
        headerLine,
        i + 1,
      );
    }
    seen.set(cell.name, i);
  });
  const channelColumns = header.map((_, i) => i).filter((i) => i !== timeColumn);
  if (channelColumns.length === 0) {
    fail("the header names no channel columns", headerLine);
  }

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
  let timeDecimals = 0;
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
      if (c === timeColumn) {
        timeDecimals = Math.max(timeDecimals, decimalsOf(cell) ?? Infinity);
      }
    }
  }

  let rate: number;
  let startTime = 0;
  if (timeColumn >= 0) {
    const derived = checkTimeColumn(
      columns[timeColumn],
      dataRows.map((r) => lineOf[r]),
      timeColumn + 1,
      timeDecimals,
      options.timeTolerance ?? 0.01,
      file,
    );
    startTime = columns[timeColumn][0];
    if (options.rate !== undefined) {
      if (Math.abs(derived - options.rate) > 1e-3 * options.rate) {
        throw new QuiverError(
          `the time column gives a rate of ${derived} Hz, but ${options.rate} Hz was given`,
          { file },
          "usage",
        );
      }
      rate = options.rate;
    } else {
      rate = derived;
    }
  } else {
    if (options.rate === undefined) {
      throw new QuiverError(
        `no time column ("time_s" or "time") in the header; give the sample rate`,
        { file, line: headerLine },
        "usage",
      );
    }
    rate = options.rate;
  }
  if (!(rate > 0) || !Number.isFinite(rate)) {
    throw new RangeError(`sample rate must be a positive number, got ${rate}`);
  }
  const channels: Channel[] = channelColumns.map((c) => ({
    name: header[c].name,
    unit: header[c].unit,
    data: columns[c],
  }));
  return { rate, startTime, channels };
}

/** Checks uniform, increasing time and returns the rate it implies. */
function checkTimeColumn(
  time: Float64Array,
  lines: number[],
  column: number,
  decimals: number,
  tolerance: number,
  file: string | undefined,
): number {
  const n = time.length;
  const fail = (detail: string, line?: number): never => {
    throw new QuiverError(detail, { file, line, column });
  };
  if (n < 2) {
    fail("one data row is not enough to derive a sample rate from the time column", lines[0]);
  }
  const total = time[n - 1] - time[0];
  if (!(total > 0)) {
    fail(
      `time does not increase from the first row (${time[0]}) to the last (${time[n - 1]})`,
      lines[n - 1],
    );
  }
  // The median step is the reference: one jump must not shift it, so the
  // error names the line of the jump itself.
  const steps = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) steps[i - 1] = time[i] - time[i - 1];
  const step = steps.slice().sort()[Math.floor((n - 1) / 2)];
  // Rounding the printed times to `decimals` places moves a step by up to
  // one quantum; a deviation that rounding alone explains means too few digits.
  const quantum = Number.isFinite(decimals) ? 10 ** -decimals : 0;
  for (let i = 1; i < n; i++) {
    const dt = steps[i - 1];
    if (dt <= 0) {
      fail(`time goes backwards or stands still (${time[i - 1]} s, then ${time[i]} s)`, lines[i]);
    }
    const deviation = Math.abs(dt - step);
    if (deviation > tolerance * step) {
      fail(
        deviation <= quantum * (1 + 1e-6)
          ? `the time column is written with ${decimals} decimals, too few for a sample interval of ${step} s ` +
            `(rate ${1 / step} Hz): steps vary by more than ${tolerance * 100} %; write at least ` +
            `${
              Math.ceil(-Math.log10(tolerance * step))
            } decimals, or drop the column and give the rate`
          : `time step of ${dt} s differs from the mean step ${step} s by more than ${
            tolerance * 100
          } %: ` +
            `a gap, jump or jitter in the time column`,
        lines[i],
      );
    }
  }
  // Every step agrees with the median, so the end points give the most
  // precise mean interval.
  return (n - 1) / total;
}
