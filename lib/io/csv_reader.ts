/**
 * CSV text held in memory as a recording. The rules (delimiter, decimal
 * mark, header `name [unit]`, time column, rate) are those of the one CSV
 * reader (csv_engine.ts, csv_recording.ts); a file on disk is read in chunks
 * by the same code (formats/csv.ts).
 *
 * @module
 */
import type { Channel, Recording } from "./recording.ts";
import { CsvRowParser } from "./csv_row_parser.ts";
import { CsvScanner } from "./csv_scanner.ts";
import { type CsvReadOptions, csvRecordingLayout, TimeStepCheck } from "./csv_recording.ts";

export type { CsvDelimiter } from "./csv_dialect.ts";
export { type HeaderCell, parseHeaderCell } from "./csv_cells.ts";
export { type CsvReadOptions, REFERENCE_STEPS, TIME_NAMES } from "./csv_recording.ts";

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
export function parseCsvRecording(text: string, options: CsvReadOptions = {}): Recording {
  const bytes = new TextEncoder().encode(text);
  const scanner = new CsvScanner(options);
  scanner.push(bytes);
  const scan = scanner.end();
  const layout = csvRecordingLayout(scan, options);
  const { header, timeColumn, channelColumns } = layout;
  const data = channelColumns.map(() => new Float64Array(layout.length));
  const check = timeColumn >= 0 ? new TimeStepCheck(timeColumn, options) : undefined;
  let r = 0;
  const parser = new CsvRowParser(scan, header.length, {
    row(values, line, decimals) {
      check?.push(values[timeColumn], line, decimals[timeColumn]);
      for (let j = 0; j < channelColumns.length; j++) data[j][r] = values[channelColumns[j]];
      r++;
    },
  }, { ...options, decimalsOf: timeColumn >= 0 ? [timeColumn] : [] });
  parser.push(bytes);
  parser.end();
  check?.end();
  const channels: Channel[] = channelColumns.map((c, j) => ({
    name: header[c].name,
    unit: header[c].unit,
    data: data[j],
  }));
  return { rate: layout.rate, startTime: layout.startTime, channels };
}
