/**
 * Reads a time-history CSV into a {@linkcode Recording}.
 *
 * Layout: one header row, then one row per sample (see csv_table.ts for the
 * accepted delimiters, decimal marks and harmless variants). A column named
 * `time_s` or `time` (any case, unit `s` if one is given) is the time axis;
 * every other column is a channel. A header cell may carry the unit in
 * brackets: `seat_rail_z [m/s^2]`. Without a time column the rate must be
 * given.
 *
 * @module
 */
import { nominalRate } from "./time_axis.ts";
import { formatNumber } from "../format_number.ts";
import { QuiverError } from "../errors.ts";
import type { Channel, Recording } from "./recording.ts";
import { type CsvTableOptions, parseNumericCsv } from "./csv_table.ts";

export { type CsvDelimiter, type HeaderCell, parseHeaderCell } from "./csv_table.ts";

/** Options of {@linkcode parseCsvRecording}. */
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
}

/** Names of the time column (any case). */
export const TIME_NAMES: ReadonlySet<string> = new Set(["time_s", "time"]);

/** Steps whose median is the reference step of the time column check. */
export const REFERENCE_STEPS = 1001;

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
  const { header, columns, lines, headerLine, decimals } = parseNumericCsv(text, options);
  let timeColumn = -1;
  header.forEach((cell, i) => {
    if (!TIME_NAMES.has(cell.name.toLowerCase())) return;
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
  });
  const channelColumns = header.map((_, i) => i).filter((i) => i !== timeColumn);
  if (channelColumns.length === 0) {
    fail("the header names no channel columns", headerLine);
  }

  let rate: number;
  let startTime = 0;
  if (timeColumn >= 0) {
    const derived = checkTimeColumn(
      columns[timeColumn],
      lines,
      timeColumn + 1,
      decimals[timeColumn],
      options.timeTolerance ?? 0.01,
      file,
    );
    startTime = columns[timeColumn][0];
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

/** Checks uniform, increasing time and returns the (nominal) rate it implies. */
function checkTimeColumn(
  time: Float64Array,
  lines: readonly number[],
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
  // Reference: the median of the first (up to) 1001 steps, which a streaming
  // reader also knows after its first chunk, so both name the same line.
  const head = steps.slice(0, REFERENCE_STEPS).sort();
  const step = head[Math.floor((head.length - 1) / 2)];
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
  // precise mean interval; rounding of the printed times is undone (time_axis.ts).
  return nominalRate(n, total, decimals);
}
