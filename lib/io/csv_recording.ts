/**
 * A CSV file as a recording: the time column, the sample rate and the
 * channels, on top of the one CSV reader (csv_engine.ts). The same code
 * serves a file read in chunks and text held in memory.
 *
 * Time: the column named by the `timeColumn` option, or else a column named
 * `time_s` or `time` (any case), in unit `s` or none, is the time axis. The rate comes from its first and last values (the nominal
 * rate of a rounded column, time_axis.ts); every step is checked against the
 * median of the first 1001 steps (1 % by default), so a gap, jump or jitter
 * is named by its line; a step that rounding of the times to the decimals or
 * significant digits the file shows explains is "too few digits" instead
 * (and let pass when the rate is given). Without a time column the rate must be given; the
 * message then lists the header's columns.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { cellOfRow, type HeaderCell, markOfRow, parseHeaderRow } from "./csv_cells.ts";
import type { CsvTableOptions } from "./csv_dialect.ts";
import { parseCellText } from "./csv_row_parser.ts";
import type { CsvScan } from "./csv_scanner.ts";
import { checkName } from "./names.ts";
import { nominalRate } from "./time_axis.ts";

/** Names of the time column (any case). */
export const TIME_NAMES: ReadonlySet<string> = new Set(["time_s", "time"]);

/** Steps whose median is the reference step of the time column check. */
export const REFERENCE_STEPS = 1001;

/** Options of reading a CSV recording. */
export interface CsvReadOptions extends CsvTableOptions {
  /**
   * Sample rate in Hz. Required when there is no time column; when there is
   * one, it must agree with the column within 0.1 % and is then used as the
   * exact rate. Default: derived from the time column.
   */
  rate?: number;
  /**
   * Largest allowed deviation of one time step from the median step, as a
   * fraction of that step. Default 0.01 (1 %).
   */
  timeTolerance?: number;
  /**
   * The time column, by its name (`Zeit`) or its whole header cell
   * (`Time [s]`). Default: the column named `time_s` or `time` (any case),
   * if there is one.
   */
  timeColumn?: string;
}

/** What a CSV recording's header and end rows say. */
export interface CsvRecordingLayout {
  readonly header: readonly HeaderCell[];
  /** Column of the time axis, −1 when none. */
  readonly timeColumn: number;
  /** File columns of the channels, in order. */
  readonly channelColumns: readonly number[];
  readonly rate: number;
  readonly startTime: number;
  /** Data rows = samples per channel. */
  readonly length: number;
}

/**
 * The layout of a CSV recording from pass 1.
 *
 * @throws {QuiverError} for a bad header, a time column that cannot give a
 * rate, or a rate that is missing or contradicts the column, or a name
 * or unit that holds a control, bidirectional or zero-width character
 * (names.ts).
 */
export function csvRecordingLayout(
  scan: CsvScan,
  options: CsvReadOptions = {},
): CsvRecordingLayout {
  const file = options.file;
  const header = parseHeaderRow(scan.headerText, scan.delimiter, scan.headerLine, file);
  header.forEach((cell, i) => {
    const where = { file, line: scan.headerLine, column: i + 1 };
    checkName(cell.name, `column ${i + 1}`, where);
    checkName(cell.unit, `the unit of column ${i + 1}`, where);
  });
  const fail = (detail: string, line?: number, column?: number): never => {
    throw new QuiverError(detail, { file, line, column });
  };
  const timeColumn = findTimeColumn(header, scan.headerLine, options);
  const channelColumns = header.map((_, i) => i).filter((i) => i !== timeColumn);
  if (channelColumns.length === 0) fail("the header names no channel columns", scan.headerLine);
  let rate: number;
  let startTime = 0;
  if (timeColumn >= 0) {
    const first = scan.first as { text: string; line: number };
    const last = scan.last as { text: string; line: number };
    if (scan.rows < 2) {
      fail("one data row is not enough to derive a sample rate from the time column", first.line);
    }
    const given = options.decimal === undefined || options.decimal === "auto"
      ? undefined
      : options.decimal;
    const markOf = (row: string) =>
      given ?? (scan.delimiter === "," ? "." : markOfRow(first.text, scan.delimiter) ??
        markOfRow(row, scan.delimiter) ?? ".");
    const time = (row: { text: string; line: number }) =>
      parseCellText(cellOfRow(row.text, scan.delimiter, timeColumn), {
        mark: markOf(row.text),
        line: row.line,
        column: timeColumn + 1,
        file,
      });
    const t0 = time(first);
    const t1 = time(last);
    const total = t1.value - t0.value;
    if (!(total > 0)) {
      fail(
        `time does not increase from the first row (${t0.value}) to the last (${t1.value})`,
        last.line,
        timeColumn + 1,
      );
    }
    const derived = nominalRate(scan.rows, total, Math.max(t0.decimals, t1.decimals));
    startTime = t0.value;
    if (options.rate !== undefined) {
      if (Math.abs(derived - options.rate) > 1e-3 * options.rate) {
        throw new QuiverError(
          `the time column gives a rate of ${
            formatNumber(derived, 8)
          } Hz, but ${options.rate} Hz was given`,
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
      throw new QuiverError(noTimeColumn(header), { file, line: scan.headerLine }, "usage");
    }
    rate = options.rate;
  }
  if (!(rate > 0) || !Number.isFinite(rate)) {
    throw new RangeError(`sample rate must be a positive number, got ${rate}`);
  }
  return { header, timeColumn, channelColumns, rate, startTime, length: scan.rows };
}

/** Columns named in a message before the rest are counted. */
const LISTED_COLUMNS = 12;

/**
 * The message for a header without a time column: the columns it has, and
 * the two ways on (`--time-column`, `--rate`).
 *
 * @example
 * ```ts
 * import { noTimeColumn } from "./csv_recording.ts";
 * const m = noTimeColumn([{ name: "Zeit", unit: "s" }, { name: "acc", unit: "g" }]);
 * if (!m.startsWith('no time column: the header\'s columns are "Zeit [s]", "acc [g]"')) throw new Error(m);
 * ```
 */
export function noTimeColumn(header: readonly HeaderCell[]): string {
  return `no time column: the header's columns are ${
    listColumns(header)
  }, none named time_s or time; ` +
    `name the time column with --time-column NAME, or give the sample rate with --rate HZ`;
}

/** The header's cells, quoted, the first {@linkcode LISTED_COLUMNS} of them, then how many more. */
function listColumns(header: readonly HeaderCell[]): string {
  const shown = header.slice(0, LISTED_COLUMNS).map((c) => `"${cellText(c)}"`).join(", ");
  return header.length > LISTED_COLUMNS
    ? `${shown} and ${header.length - LISTED_COLUMNS} more`
    : shown;
}

/** A header cell as written: `name [unit]`, or the name alone. */
function cellText(cell: HeaderCell): string {
  return cell.unit === "" ? cell.name : `${cell.name} [${cell.unit}]`;
}

/**
 * The time column of a header (0-based), −1 when there is none: the column
 * named by `options.timeColumn` (its name, or its whole cell `Time [s]`), or
 * else the one named `time_s` or `time` in any case. Its unit must be
 * seconds or none.
 *
 * @throws {QuiverError} for a named column the header lacks (usage), two
 * columns with time names, or a time column in another unit.
 *
 * @example
 * ```ts
 * import { findTimeColumn } from "./csv_recording.ts";
 * const header = [{ name: "Zeit", unit: "s" }, { name: "time", unit: "" }];
 * if (findTimeColumn(header, 1) !== 1) throw new Error();
 * if (findTimeColumn(header, 1, { timeColumn: "Zeit [s]" }) !== 0) throw new Error();
 * ```
 */
export function findTimeColumn(
  header: readonly HeaderCell[],
  headerLine: number,
  options: { timeColumn?: string; file?: string } = {},
): number {
  const file = options.file;
  const fail = (detail: string, column?: number): never => {
    throw new QuiverError(detail, { file, line: headerLine, column });
  };
  let found = -1;
  const wanted = options.timeColumn?.trim();
  if (wanted !== undefined) {
    // A whole cell is compared with its spacing normalised: "Time[s]" and "Time [s]" are one cell.
    const norm = (text: string) => text.replace(/\s*\[\s*/, " [").replace(/\s*\]$/, "]");
    found = header.findIndex((c) => c.name === wanted || norm(cellText(c)) === norm(wanted));
    if (found < 0) {
      throw new QuiverError(
        `--time-column "${wanted}" names no column; the header's columns are ${
          listColumns(header)
        }`,
        { file, line: headerLine },
        "usage",
      );
    }
  } else {
    header.forEach((cell, i) => {
      if (!TIME_NAMES.has(cell.name.toLowerCase())) return;
      if (found >= 0) {
        fail(
          `two time columns ("${header[found].name}" in column ${
            found + 1
          } and "${cell.name}"); name one with --time-column`,
          i + 1,
        );
      }
      found = i;
    });
  }
  if (found >= 0) {
    const cell = header[found];
    if (cell.unit !== "" && cell.unit !== "s") {
      fail(
        `time column "${cell.name}" is in [${cell.unit}]; quiver expects seconds [s]`,
        found + 1,
      );
    }
  }
  return found;
}

/**
 * 0.999 × 10^m at index m + POWER_OFFSET, m from −330 to 330. A time of at
 * most 0.999 × 10^m, with m = the most significant digits seen less this
 * row's decimals, has log10 below m − 0.0004, which no rounding of
 * Math.log10 carries to m: the row's significant digits are at most those
 * seen, and the logarithm (a tenth of the CSV reader's time) is skipped.
 */
const POWER_OFFSET = 330;
const BELOW_POWER = Float64Array.from(
  { length: 2 * POWER_OFFSET + 1 },
  (_, i) => 0.999 * 10 ** (i - POWER_OFFSET),
);

/**
 * Checks the time column row by row: increasing, and every step within the
 * tolerance of the median of the first {@linkcode REFERENCE_STEPS} steps.
 */
export class TimeStepCheck {
  readonly #tolerance: number;
  readonly #column: number;
  readonly #file?: string;
  /** With a rate given, steps that only rounding of the times moved are let pass. */
  readonly #rateGiven: boolean;
  #previous = NaN;
  #reference = NaN;
  #decimals = 0;
  /** The most significant digits a time was written with (%.7g writes 7). */
  #significant = 0;
  readonly #head: { dt: number; line: number; from: number; to: number }[] = [];

  constructor(column: number, options: CsvReadOptions = {}) {
    this.#column = column;
    this.#tolerance = options.timeTolerance ?? 0.01;
    this.#file = options.file;
    this.#rateGiven = options.rate !== undefined;
  }

  /** The next row's time, line and decimals written. @throws {QuiverError} at a bad step. */
  push(time: number, line: number, decimals: number): void {
    if (decimals > this.#decimals) this.#decimals = decimals;
    // Digits written: those before the point (from the magnitude) plus the decimals. The
    // logarithm only when they could exceed the most seen (see BELOW_POWER).
    if (time !== 0 && Number.isFinite(decimals)) {
      const k = this.#significant - decimals + POWER_OFFSET;
      if (!(k >= 0 && k < BELOW_POWER.length && Math.abs(time) <= BELOW_POWER[k])) {
        const significant = Math.floor(Math.log10(Math.abs(time))) + 1 + decimals;
        if (significant > this.#significant) this.#significant = significant;
      }
    }
    const previous = this.#previous;
    this.#previous = time;
    if (Number.isNaN(previous)) return;
    const dt = time - previous;
    if (dt <= 0) {
      this.#fail(`time goes backwards or stands still (${previous} s, then ${time} s)`, line);
    }
    if (Number.isNaN(this.#reference)) {
      this.#head.push({ dt, line, from: previous, to: time });
      if (this.#head.length === REFERENCE_STEPS) this.#settle();
      return;
    }
    this.#judge(dt, line, previous, time);
  }

  /** Ends the check (judges the steps held back when there were few). */
  end(): void {
    if (Number.isNaN(this.#reference) && this.#head.length > 0) this.#settle();
  }

  #settle(): void {
    const sorted = this.#head.map((h) => h.dt).sort((a, b) => a - b);
    this.#reference = sorted[Math.floor((sorted.length - 1) / 2)];
    for (const h of this.#head) this.#judge(h.dt, h.line, h.from, h.to);
    this.#head.length = 0;
  }

  /**
   * The rounding quantum of a written time: one unit of the last decimal, or,
   * for a column written to a number of significant digits (%.7g), one unit
   * of the last digit at this magnitude (10⁻⁵ s from 10 s on), whichever is
   * larger.
   */
  #quantum(time: number): number {
    const decimals = this.#decimals;
    if (!Number.isFinite(decimals)) return 0;
    const byDecimals = 10 ** -decimals;
    if (time === 0 || this.#significant === 0) return byDecimals;
    const bySignificant = 10 ** (Math.floor(Math.log10(Math.abs(time))) - this.#significant + 1);
    return Math.max(byDecimals, bySignificant);
  }

  #judge(dt: number, line: number, from: number, to: number): void {
    const step = this.#reference;
    const tolerance = this.#tolerance;
    const deviation = Math.abs(dt - step);
    if (deviation <= tolerance * step) return;
    // Rounding the printed times moves a step by up to one quantum of its ends; a deviation
    // that rounding alone explains means too few digits, not a gap.
    const quantum = Math.max(this.#quantum(from), this.#quantum(to));
    if (deviation <= quantum * (1 + 1e-6)) {
      // The rate was given: the column's rounding does not matter.
      if (this.#rateGiven) return;
      const decimals = this.#decimals;
      const bySignificant = quantum > 10 ** -decimals * (1 + 1e-6);
      this.#fail(
        `the time column has too few digits for this rate (${
          bySignificant
            ? `written with ${this.#significant} significant digits, a time near ${
              formatNumber(to, 3)
            } s is known to ${formatNumber(quantum, 3)} s`
            : `written with ${decimals} decimals, too few`
        } for a sample interval of ${formatNumber(step, 4)} s, rate ${
          formatNumber(1 / step, 4)
        } Hz: steps vary by more than ${tolerance * 100} %; write at least ${
          Math.ceil(-Math.log10(tolerance * step))
        } decimals); give --rate HZ to ignore it`,
        line,
      );
    }
    this.#fail(
      `time step of ${dt} s differs from the mean step ${step} s by more than ${
        tolerance * 100
      } %: a gap, jump or jitter in the time column`,
      line,
    );
  }

  #fail(detail: string, line: number): never {
    throw new QuiverError(detail, { file: this.#file, line, column: this.#column + 1 });
  }
}
