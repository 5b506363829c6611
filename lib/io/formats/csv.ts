/**
 * CSV recordings (and semicolon- or tab-separated ones): UTF-8 text, read by
 * the one CSV reader (csv_engine.ts) in two passes over the bytes. Pass 1 at
 * opening (header, rows counted, first and last rows), pass 2
 * when the stream is read.
 * A fault is reported where it is found, with file, line and column; nothing
 * is read twice to find it. The format tried when no binary format claims a
 * file.
 *
 * @module
 */
import { open } from "node:fs/promises";
import { markOfRow, parseHeaderRow } from "../csv_cells.ts";
import { DELIMITER_NAMES } from "../csv_dialect.ts";
import { csvRecordingLayout, findTimeColumn, TimeStepCheck } from "../csv_recording.ts";
import { changedWhileRead, CsvRowParser, firstDecimalMark } from "../csv_row_parser.ts";
import { type CsvScan, CsvScanner } from "../csv_scanner.ts";
import { CHUNK_ROWS, type RecordingStream } from "../recording_source.ts";
import {
  channelTransforms,
  type FormatOptions,
  type RecordingDescription,
  type RecordingFormat,
  refuseGroup,
} from "./format.ts";

const READ_BYTES = 1 << 20;

/**
 * Reads a file's bytes chunk by chunk into `onBytes`. Two buffers, reused:
 * the next chunk is read while `onBytes` works on the current one, so the
 * parser does not wait for the disk (or the page cache) between chunks.
 */
async function eachChunk(path: string, onBytes: (bytes: Uint8Array) => void): Promise<void> {
  const handle = await open(path, "r");
  let current = new Uint8Array(READ_BYTES);
  let next = new Uint8Array(READ_BYTES);
  let reading = handle.read(current, 0, READ_BYTES, null);
  try {
    for (;;) {
      const { bytesRead } = await reading;
      if (bytesRead === 0) break;
      reading = handle.read(next, 0, READ_BYTES, null);
      onBytes(current.subarray(0, bytesRead));
      [current, next] = [next, current];
    }
  } finally {
    await reading.catch(() => undefined); // a parse error: let the read ahead finish first
    await handle.close();
  }
}

async function openCsv(
  path: string,
  options: FormatOptions,
): Promise<RecordingStream> {
  refuseGroup(options, "CSV", path);
  const csvOptions = { ...options, file: path };
  const scanner = new CsvScanner(csvOptions);
  let bytes = 0;
  await eachChunk(path, (chunk) => {
    bytes += chunk.length;
    scanner.push(chunk);
  });
  const scan = scanner.end();
  const layout = csvRecordingLayout(scan, csvOptions);
  const { header, timeColumn, channelColumns, length } = layout;
  const transforms = await channelTransforms(channelColumns.map((i) => header[i]), options);
  return {
    rate: layout.rate,
    startTime: layout.startTime,
    length,
    channels: transforms.map(({ factor: _f, ...meta }) => meta),
    async read(selected, onChunk) {
      const factors = selected.map((s) => transforms[s].factor);
      const columns = selected.map((s) => channelColumns[s]);
      const check = timeColumn >= 0 ? new TimeStepCheck(timeColumn, csvOptions) : undefined;
      // One array per channel, reused for every chunk.
      const chunkRows = Math.min(CHUNK_ROWS, length);
      const buffers = selected.map(() => new Float64Array(chunkRows));
      let filled = 0;
      let rows = 0;
      const flush = () => {
        if (filled === 0) return;
        onChunk(buffers.map((b) => b.subarray(0, filled)));
        filled = 0;
      };
      const parser = new CsvRowParser(scan, header.length, {
        row(values, line, decimals) {
          if (++rows > length) throw changedWhileRead(path, length);
          check?.push(values[timeColumn], line, decimals[timeColumn]);
          for (let j = 0; j < columns.length; j++) {
            buffers[j][filled] = values[columns[j]] * factors[j];
          }
          if (++filled === chunkRows) flush();
        },
      }, { ...csvOptions, decimalsOf: timeColumn >= 0 ? [timeColumn] : [] });
      let read = 0;
      await eachChunk(path, (chunk) => {
        read += chunk.length;
        parser.push(chunk);
      });
      if (read !== bytes) throw changedWhileRead(path, length); // before a cut row is judged
      parser.end();
      if (rows < length) throw changedWhileRead(path, length);
      check?.end();
      flush();
    },
  };
}

/** Pass 1 over the whole file. */
async function scanCsv(path: string, options: Omit<FormatOptions, "setup">): Promise<CsvScan> {
  const scanner = new CsvScanner({ file: path, delimiter: options.delimiter ?? "auto" });
  await eachChunk(path, (chunk) => scanner.push(chunk));
  return scanner.end();
}

/** What `quiver info` shows of a CSV file: pass 1 only (header, rows counted, first and last rows). */
async function describeCsv(
  path: string,
  options: Omit<FormatOptions, "setup">,
): Promise<RecordingDescription> {
  refuseGroup(options, "CSV", path);
  const scan = await scanCsv(path, options);
  const header = parseHeaderRow(scan.headerText, scan.delimiter, scan.headerLine, path);
  const timeColumn = findTimeColumn(header, scan.headerLine, { ...options, file: path });
  let rate: number | null = null;
  let rateFrom: string | null = null;
  let startTime: number | null = null;
  if (timeColumn >= 0 || options.rate !== undefined) {
    const layout = csvRecordingLayout(scan, { ...options, file: path });
    rate = layout.rate;
    rateFrom = options.rate !== undefined
      ? (timeColumn >= 0 ? "--rate, agreeing with the time column" : "--rate")
      : "the time column";
    startTime = layout.startTime;
  }
  const columns = header.map((_, i) => i).filter((i) => i !== timeColumn);
  const delimiterFrom = options.delimiter !== undefined && options.delimiter !== "auto"
    ? "given with --delimiter"
    : scan.delimiter === ","
    ? "the header holds no semicolon or tab"
    : `the header holds a ${DELIMITER_NAMES[scan.delimiter]}`;
  const given = options.decimal !== undefined && options.decimal !== "auto";
  const first = firstDecimalMark(scan, options.decimal);
  const last = first === undefined ? markOfRow(scan.last?.text ?? "", scan.delimiter) : undefined;
  const mark = first !== undefined
    ? {
      char: first,
      from: given
        ? "given with --decimal"
        : scan.delimiter === ","
        ? "implied by the comma delimiter"
        : "found in the first data row",
    }
    : last !== undefined
    ? { char: last, from: "found in the last data row; the first shows none" }
    : null;
  return {
    delimiter: { char: scan.delimiter, from: delimiterFrom },
    decimalMark: mark,
    timeColumn: timeColumn >= 0
      ? { name: header[timeColumn].name, unit: header[timeColumn].unit, column: timeColumn + 1 }
      : null,
    rate,
    rateFrom,
    startTime,
    samples: scan.rows,
    channels: columns.map((i) => ({ position: i + 1, name: header[i].name, unit: header[i].unit })),
    positionName: "column",
  };
}

/**
 * The CSV format: any file no binary format claims is tried as CSV text.
 *
 * @example
 * ```ts
 * import { csvFormat } from "./csv.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/r.csv`, "time_s;a [V]\n0;1,5\n0,5;2\n");
 * const d = await csvFormat.describe(`${dir}/r.csv`, {});
 * const s = await csvFormat.open(`${dir}/r.csv`, {});
 * if (d.delimiter?.char !== ";" || d.decimalMark?.char !== "," || s.rate !== 2 || s.length !== 2) throw new Error();
 * ```
 */
export const csvFormat: RecordingFormat = {
  name: "csv",
  label: "CSV",
  kind: "text",
  sniff: () => true,
  open: openCsv,
  describe: describeCsv,
};
