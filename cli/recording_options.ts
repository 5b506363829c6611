/**
 * The options every command that reads a recording shares.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import type { ReadRecordingOptions } from "../lib/io/read_recording.ts";
import { openRecordingStream, type RecordingStream } from "../lib/io/recording_stream.ts";
import { inFileAsync, numberOption } from "./args.ts";
import { option } from "./option_table.ts";
import { checkOptionLimits } from "./option_limits.ts";

/** The options of reading a recording. */
export const RECORDING_TABLE = {
  rate: option(numberOption().pipe(z.number().positive("must be a positive number of Hz")), {
    value: "HZ",
    help:
      "sample rate, needed when the CSV has no time_s/time column\n(checked against the column when it has one; WAV states its own)",
  }),
  start: option(numberOption(), {
    value: "S",
    help:
      "analyse only the samples at times S_start <= t < S_end, in s on\nthe recording's own time axis",
    default: "all",
    helpWith: "end",
  }),
  end: option(numberOption(), { value: "S", help: "end of the time slice, s" }),
  "time-column": option(z.string().trim().min(1, "must name a column"), {
    value: "NAME",
    help:
      'the time column, by name (Zeit) or whole header cell ("Time [s]");\nits unit must be s or none',
    default: "time_s or time",
  }),
  group: option(z.string().trim().min(1, "must name a group"), {
    value: "NAME",
    help:
      "the group to read in a file that holds several (an HDF5 group's\npath, an MDF 4 channel group's name or index)",
    default: "the only one",
  }),
  setup: option(z.string(), {
    value: "FILE.json",
    help: 'channel set-up: units, sensitivities, roles (README.md,\n"Channel set-up")',
  }),
  delimiter: option(z.enum(["auto", "comma", "semicolon", "tab"]), {
    value: "D",
    help: "auto | comma | semicolon | tab",
    default: "auto",
  }),
  decimal: option(z.enum(["auto", "point", "comma"]), {
    value: "M",
    help: "auto | point | comma",
    default: "auto",
  }),
};

/** The heading of the recording options' help. */
export const RECORDING_HEADING = "Reading the recording";

/**
 * Reader options, carrying the command's other options along so that
 * {@linkcode analyseRecording} can check those that size memory or time
 * against the header (option_limits.ts) before the analysis reads a sample.
 */
export type CommandReadOptions = ReadRecordingOptions & {
  /** Every option of the command, as parsed. */
  readonly sizing?: Readonly<Record<string, unknown>>;
};

/** Converts validated recording options to reader options (with the rest for the limits). */
export function toReadOptions(values: {
  rate?: number;
  setup?: string;
  start?: number;
  end?: number;
  delimiter?: "auto" | "comma" | "semicolon" | "tab";
  decimal?: "auto" | "point" | "comma";
  "time-column"?: string;
  group?: string;
}): CommandReadOptions {
  const delimiters = { auto: "auto", comma: ",", semicolon: ";", tab: "\t" } as const;
  const decimals = { auto: "auto", point: ".", comma: "," } as const;
  return {
    ...(values.rate !== undefined ? { rate: values.rate } : {}),
    ...(values.setup !== undefined ? { setup: values.setup } : {}),
    ...(values.start !== undefined ? { start: values.start } : {}),
    ...(values.end !== undefined ? { end: values.end } : {}),
    ...(values["time-column"] !== undefined ? { timeColumn: values["time-column"] } : {}),
    ...(values.group !== undefined ? { group: values.group } : {}),
    delimiter: delimiters[values.delimiter ?? "auto"],
    decimal: decimals[values.decimal ?? "auto"],
    sizing: values as Readonly<Record<string, unknown>>,
  };
}

/**
 * Opens the recording for chunked reading, checks the options that size
 * memory or time against its header (option_limits.ts), and runs the
 * analysis on it. The analysis decides whether it reads in chunks or
 * collects the whole record; a fault is reported once, where the reader
 * finds it.
 */
export async function analyseRecording<T>(
  input: string,
  options: CommandReadOptions,
  analysis: (stream: RecordingStream) => Promise<T>,
): Promise<T> {
  const { sizing, ...read } = options;
  const stream = await openRecordingStream(input, read);
  // The header is known: refuse what the record or the machine cannot hold, before any work.
  if (sizing !== undefined) {
    checkOptionLimits(
      { rate: stream.rate, length: stream.length, channels: stream.channels.length },
      sizing,
      input,
    );
  }
  return await inFileAsync(input, () => analysis(stream));
}
