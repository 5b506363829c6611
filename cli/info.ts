/**
 * `quiver info`: what a recording holds and how quiver reads it, without
 * analysing it: channels and units, sample rate, length, and for a CSV the
 * delimiter, decimal mark and time column found; with `--setup`, what the
 * set-up changes. A CSV is read by pass 1 only (header, row count, first and
 * last rows); a WAV by its header only.
 *
 * @module
 */
import process from "node:process";
import { open, readFile } from "node:fs/promises";
import { resolve } from "node:path";
import { z } from "npm:zod@4.6.7";
import { formatNumber } from "../lib/format_number.ts";
import {
  type ChannelSetup,
  type ChannelTransform,
  parseChannelSetup,
  setupTransforms,
} from "../lib/io/channel_setup.ts";
import {
  type CsvDelimiter,
  CsvScanner,
  firstDecimalMark,
  markOfRow,
  parseHeaderRow,
} from "../lib/io/csv_engine.ts";
import { csvRecordingLayout, findTimeColumn } from "../lib/io/csv_recording.ts";
import { assertRegularFile } from "../lib/io/file_kinds.ts";
import { openRecordingStream, unreadable } from "../lib/io/recording_stream.ts";
import { looksLikeWav } from "../lib/io/wav.ts";
import type { DecimalMark } from "../lib/io/numbers.ts";
import { inFileAsync, parseCommandArgs, usageError } from "./args.ts";
import { commandHelp, option, shapeOf, specOf } from "./option_table.ts";
import { RECORDING_HEADING, RECORDING_TABLE, toReadOptions } from "./recording_options.ts";
import { printable } from "./terminal.ts";

/** One-line summary for the command list. */
export const summary = "what a recording holds and how it is read (channels, rate, length)";

const OUTPUT = {
  json: option(z.boolean(), { flag: true, help: "print JSON instead of text" }),
};

/** The reading options that change what is found (a time slice does not). */
const READING = {
  rate: RECORDING_TABLE.rate,
  "time-column": RECORDING_TABLE["time-column"],
  setup: RECORDING_TABLE.setup,
  delimiter: RECORDING_TABLE.delimiter,
  decimal: RECORDING_TABLE.decimal,
};

const TABLE = { ...READING, ...OUTPUT };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver info IN [options]",
  about: `What the recording IN (CSV or WAV) holds and how quiver reads it:
channels with their units, sample rate, length in samples and seconds; for a
CSV the delimiter, decimal mark and time column found; with --setup what the
set-up changes (names, units, factors, roles). Nothing is analysed: a CSV is
read by the first pass only (header, rows counted, first and last rows), so
the time steps and the cells are checked by the commands that read them.`,
  groups: [[RECORDING_HEADING, READING], ["Output", OUTPUT]],
  notes: `Channels are shown as "name [unit in the file]", then "-> name [unit]
× factor" when reading changes them (the SI base unit, a set-up).`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** One channel: where it is in the file and what reading makes of it. */
interface ChannelInfo {
  /** 1-based CSV column or WAV channel. */
  readonly column: number;
  readonly name: string;
  /** Unit in the file ("" when none). */
  readonly unit: string;
  /** Name, unit, factor on the samples and role after reading (SI base unit, set-up). */
  readonly read_as: { name: string; unit: string; factor: number; role?: string };
}

/** What `quiver info` finds; the JSON form as it is printed. */
interface RecordingInfo {
  readonly file: string;
  readonly format: "csv" | "wav";
  readonly delimiter: { readonly char: CsvDelimiter; readonly from: string } | null;
  readonly decimal_mark: { readonly char: DecimalMark; readonly from: string } | null;
  readonly time_column:
    | { readonly name: string; readonly unit: string; readonly column: number }
    | null;
  readonly rate_hz: number | null;
  readonly rate_from: string | null;
  readonly start_time_s: number | null;
  readonly samples: number;
  readonly duration_s: number | null;
  readonly channels: readonly ChannelInfo[];
  readonly setup: string | null;
}

const DELIMITER_NAMES: Record<CsvDelimiter, string> = {
  ",": "comma",
  ";": "semicolon",
  "\t": "tab",
};
const MARK_NAMES: Record<DecimalMark, string> = { ".": "point", ",": "comma" };

/** Reads and validates the set-up file, as the reader does. */
async function loadSetup(path: string | undefined): Promise<ChannelSetup | undefined> {
  if (path === undefined) return undefined;
  assertRegularFile(path, "channel set-up");
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    throw unreadable(path, error);
  }
  return parseChannelSetup(text, path);
}

/** Pass 1 of the CSV reader over the whole file. */
async function scanCsv(path: string, delimiter: CsvDelimiter | "auto") {
  const scanner = new CsvScanner({ file: path, delimiter });
  const handle = await open(path, "r");
  try {
    const buffer = new Uint8Array(1 << 20);
    for (;;) {
      const { bytesRead } = await handle.read(buffer, 0, buffer.length, null);
      if (bytesRead === 0) break;
      scanner.push(buffer.subarray(0, bytesRead));
    }
  } finally {
    await handle.close();
  }
  return scanner.end();
}

function channelInfo(
  column: number,
  raw: { name: string; unit: string },
  t: ChannelTransform,
): ChannelInfo {
  return {
    column,
    name: raw.name,
    unit: raw.unit,
    read_as: {
      name: t.name,
      unit: t.unit,
      factor: t.factor,
      ...(t.role !== undefined ? { role: t.role } : {}),
    },
  };
}

async function csvInfo(
  path: string,
  read: ReturnType<typeof toReadOptions>,
  setup: ChannelSetup | undefined,
  setupPath: string | undefined,
): Promise<Omit<RecordingInfo, "file" | "setup">> {
  const scan = await scanCsv(path, read.delimiter ?? "auto");
  const header = parseHeaderRow(scan.headerText, scan.delimiter, scan.headerLine, path);
  const timeColumn = findTimeColumn(header, scan.headerLine, { ...read, file: path });
  let rate: number | null = null;
  let rateFrom: string | null = null;
  let startTime: number | null = null;
  if (timeColumn >= 0 || read.rate !== undefined) {
    const layout = csvRecordingLayout(scan, { ...read, file: path });
    rate = layout.rate;
    rateFrom = read.rate !== undefined
      ? (timeColumn >= 0 ? "--rate, agreeing with the time column" : "--rate")
      : "the time column";
    startTime = layout.startTime;
  }
  const columns = header.map((_, i) => i).filter((i) => i !== timeColumn);
  const raw = columns.map((i) => header[i]);
  const transforms = setupTransforms(raw, setup ?? { channels: {} }, setupPath);
  const delimiterFrom = read.delimiter !== undefined && read.delimiter !== "auto"
    ? "given with --delimiter"
    : scan.delimiter === ","
    ? "the header holds no semicolon or tab"
    : `the header holds a ${DELIMITER_NAMES[scan.delimiter]}`;
  const given = read.decimal !== undefined && read.decimal !== "auto";
  const first = firstDecimalMark(scan, read.decimal);
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
    format: "csv",
    delimiter: { char: scan.delimiter, from: delimiterFrom },
    decimal_mark: mark,
    time_column: timeColumn >= 0
      ? { name: header[timeColumn].name, unit: header[timeColumn].unit, column: timeColumn + 1 }
      : null,
    rate_hz: rate,
    rate_from: rateFrom,
    start_time_s: startTime,
    samples: scan.rows,
    duration_s: rate === null ? null : scan.rows / rate,
    channels: raw.map((cell, j) => channelInfo(columns[j] + 1, cell, transforms[j])),
  };
}

async function wavInfo(
  path: string,
  read: ReturnType<typeof toReadOptions>,
  setup: ChannelSetup | undefined,
  setupPath: string | undefined,
): Promise<Omit<RecordingInfo, "file" | "setup">> {
  // The header only: the stream is opened, never read. Without a set-up the
  // channels are as the file holds them (fractions of full scale).
  const { sizing: _sizing, setup: _setup, ...plain } = read;
  const stream = await openRecordingStream(path, plain);
  const raw = stream.channels.map((c) => ({ name: c.name, unit: c.unit }));
  const transforms = setupTransforms(raw, setup ?? { channels: {} }, setupPath);
  return {
    format: "wav",
    delimiter: null,
    decimal_mark: null,
    time_column: null,
    rate_hz: stream.rate,
    rate_from: "the WAV header",
    start_time_s: stream.startTime,
    samples: stream.length,
    duration_s: stream.length / stream.rate,
    channels: raw.map((c, i) => channelInfo(i + 1, c, transforms[i])),
  };
}

/**
 * What `quiver info` finds in a recording (CSV or WAV, told by its first
 * bytes), without reading its samples.
 */
async function recordingInfo(
  input: string,
  read: ReturnType<typeof toReadOptions>,
): Promise<RecordingInfo> {
  assertRegularFile(input, "recording");
  const magic = new Uint8Array(12);
  try {
    const h = await open(input, "r");
    try {
      await h.read(magic, 0, 12, 0);
    } finally {
      await h.close();
    }
  } catch (error) {
    throw unreadable(input, error);
  }
  const setup = await loadSetup(read.setup);
  const setupPath = read.setup;
  const found = looksLikeWav(magic)
    ? await wavInfo(input, read, setup, setupPath)
    : await csvInfo(input, read, setup, setupPath);
  return {
    file: resolve(input),
    ...found,
    setup: setupPath === undefined ? null : resolve(setupPath),
  };
}

const quote = (text: string) => `"${printable(text)}"`;
const withUnit = (name: string, unit: string) =>
  unit === "" ? printable(name) : `${printable(name)} [${printable(unit)}]`;

/** The human-readable form. */
function infoText(info: RecordingInfo): string {
  const lines = [`file: ${printable(info.file)}`, `format: ${info.format.toUpperCase()}`];
  if (info.delimiter !== null) {
    lines.push(`delimiter: ${DELIMITER_NAMES[info.delimiter.char]} (${info.delimiter.from})`);
    lines.push(
      info.decimal_mark === null
        ? "decimal mark: none in the first and last data rows (whole numbers there)"
        : `decimal mark: ${MARK_NAMES[info.decimal_mark.char]} (${info.decimal_mark.from})`,
    );
    const t = info.time_column;
    lines.push(
      t === null
        ? "time column: none (no column named time_s or time; --time-column names one)"
        : `time column: ${quote(t.name)}${
          t.unit === "" ? "" : ` [${printable(t.unit)}]`
        }, column ${t.column}`,
    );
  }
  lines.push(
    info.rate_hz === null
      ? "sample rate: unknown without a time column: give --rate HZ"
      : `sample rate: ${formatNumber(info.rate_hz, 10)} Hz (from ${info.rate_from})`,
  );
  if (info.start_time_s !== null && info.start_time_s !== 0) {
    lines.push(`start time: ${formatNumber(info.start_time_s, 10)} s`);
  }
  lines.push(
    info.duration_s === null
      ? `length: ${info.samples} samples`
      : `length: ${info.samples} samples, ${formatNumber(info.duration_s, 10)} s`,
  );
  lines.push(`channels: ${info.channels.length}`);
  const where = info.format === "csv" ? "column" : "channel";
  for (const c of info.channels) {
    const r = c.read_as;
    const changed = r.name !== c.name || r.unit !== c.unit || r.factor !== 1 ||
      r.role !== undefined;
    const to = changed
      ? ` -> ${withUnit(r.name, r.unit)}${
        r.factor !== 1 ? ` × ${formatNumber(r.factor, 10)}` : ""
      }${r.role !== undefined ? `, role ${r.role}` : ""}`
      : "";
    lines.push(`  ${where} ${c.column}: ${withUnit(c.name, c.unit)}${to}`);
  }
  if (info.setup === null) {
    lines.push("set-up: none (units as in the file, converted to SI base units)");
  } else {
    const changes = info.channels.filter((c) => {
      const r = c.read_as;
      return r.name !== c.name || r.unit !== c.unit || r.factor !== 1 || r.role !== undefined;
    }).length;
    lines.push(
      `set-up: ${
        printable(info.setup)
      } (${changes} of ${info.channels.length} channels changed on reading)`,
    );
  }
  return `${lines.join("\n")}\n`;
}

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`info takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const info = await inFileAsync(input, () => recordingInfo(input, toReadOptions(values)));
  process.stdout.write(
    values.json === true ? `${JSON.stringify(info, null, 2)}\n` : infoText(info),
  );
}
