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
import { resolve } from "node:path";
import { z } from "npm:zod@4.6.7";
import { formatNumber } from "../lib/format_number.ts";
import {
  type ChannelSetup,
  type ChannelTransform,
  readChannelSetup,
  setupTransforms,
} from "../lib/io/channel_setup.ts";
import { type CsvDelimiter, DELIMITER_NAMES } from "../lib/io/csv_dialect.ts";
import { type DescribedChannel, sniffRecording } from "../lib/io/formats/mod.ts";
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
  group: RECORDING_TABLE.group,
  setup: RECORDING_TABLE.setup,
  delimiter: RECORDING_TABLE.delimiter,
  decimal: RECORDING_TABLE.decimal,
};

const TABLE = { ...READING, ...OUTPUT };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver info IN [options]",
  about: `What the recording IN (CSV, WAV, HDF5, MAT v7.3) holds and how quiver reads it:
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
  /** The format's name (formats/mod.ts): "csv", "wav". */
  readonly format: string;
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
  /** Every group of a file that holds several (the one described above among them). */
  readonly groups?: readonly {
    readonly name: string;
    readonly samples: number | null;
    readonly rate_hz: number | null;
    readonly channels: readonly { readonly name: string; readonly unit: string }[];
  }[];
  /** What the file holds that quiver does not read, in words. */
  readonly unsupported?: readonly string[];
}

const MARK_NAMES: Record<DecimalMark, string> = { ".": "point", ",": "comma" };

function channelInfo(raw: DescribedChannel, t: ChannelTransform): ChannelInfo {
  return {
    column: raw.position,
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

/**
 * What `quiver info` finds in a recording (its format told by its first
 * bytes: formats/mod.ts), without reading its samples; with what a
 * channel's place is called in the text.
 */
async function recordingInfo(
  input: string,
  read: ReturnType<typeof toReadOptions>,
): Promise<{ info: RecordingInfo; where: string }> {
  const format = await sniffRecording(input);
  const setupPath = read.setup;
  const setup: ChannelSetup | undefined = setupPath === undefined
    ? undefined
    : await readChannelSetup(setupPath);
  // The set-up is applied here, to the channels as the file holds them.
  const { sizing: _sizing, setup: _setup, ...plain } = read;
  const found = await format.describe(input, plain);
  const transforms = setupTransforms(found.channels, setup ?? { channels: {} }, setupPath);
  const info: RecordingInfo = {
    file: resolve(input),
    format: format.name,
    delimiter: found.delimiter,
    decimal_mark: found.decimalMark,
    time_column: found.timeColumn,
    rate_hz: found.rate,
    rate_from: found.rateFrom,
    start_time_s: found.startTime,
    samples: found.samples,
    duration_s: found.rate === null ? null : found.samples / found.rate,
    channels: found.channels.map((c, i) => channelInfo(c, transforms[i])),
    setup: setupPath === undefined ? null : resolve(setupPath),
    ...(found.groups !== undefined
      ? {
        groups: found.groups.map((g) => ({
          name: g.name,
          samples: g.samples,
          rate_hz: g.rate,
          channels: g.channels.map((c) => ({ name: c.name, unit: c.unit })),
        })),
      }
      : {}),
    ...(found.unsupported !== undefined && found.unsupported.length > 0
      ? { unsupported: found.unsupported }
      : {}),
  };
  return { info, where: found.positionName };
}

const quote = (text: string) => `"${printable(text)}"`;
const withUnit = (name: string, unit: string) =>
  unit === "" ? printable(name) : `${printable(name)} [${printable(unit)}]`;

/** The human-readable form. */
function infoText(info: RecordingInfo, where: string): string {
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
  if (info.groups !== undefined) {
    lines.push(`groups: ${info.groups.length}`);
    for (const g of info.groups) {
      const rate = g.rate_hz === null ? "rate unknown" : `${formatNumber(g.rate_hz, 10)} Hz`;
      const samples = g.samples === null ? "length unknown" : `${g.samples} samples`;
      lines.push(
        `  ${quote(g.name)}: ${g.channels.length} channels, ${rate}, ${samples}`,
      );
    }
  }
  for (const u of info.unsupported ?? []) lines.push(`not read: ${printable(u)}`);
  return `${lines.join("\n")}\n`;
}

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`info takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const { info, where } = await inFileAsync(
    input,
    () => recordingInfo(input, toReadOptions(values)),
  );
  process.stdout.write(
    values.json === true ? `${JSON.stringify(info, null, 2)}\n` : infoText(info, where),
  );
}
