/**
 * The options every command that reads a recording shares.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import type { ReadRecordingOptions } from "../lib/io/read_recording.ts";
import { openRecordingStream, type RecordingStream } from "../lib/io/recording_stream.ts";
import { inFileAsync, numberOption, type OptionSpec } from "./args.ts";

/** parseArgs spec of the recording options. */
export const RECORDING_OPTIONS: OptionSpec = {
  rate: { type: "string" },
  setup: { type: "string" },
  start: { type: "string" },
  end: { type: "string" },
  delimiter: { type: "string" },
  decimal: { type: "string" },
};

/** zod shape of the recording options. */
export const recordingOptionsShape = {
  rate: numberOption().pipe(z.number().positive("must be a positive number of Hz")).optional(),
  setup: z.string().optional(),
  start: numberOption().optional(),
  end: numberOption().optional(),
  delimiter: z.enum(["auto", "comma", "semicolon", "tab"]).optional(),
  decimal: z.enum(["auto", "point", "comma"]).optional(),
};

/** Help lines for the recording options. */
export const RECORDING_HELP = `Reading the recording:
  --rate HZ            sample rate, needed when the CSV has no time_s/time column
                       (checked against the column when it has one; WAV states its own)
  --start S, --end S   analyse only the samples at times S_start <= t < S_end, in s on
                       the recording's own time axis               (default: all)
  --setup FILE.json    channel set-up: units, sensitivities, roles (README.md,
                       "Channel set-up")
  --delimiter D        auto | comma | semicolon | tab            (default auto)
  --decimal M          auto | point | comma                      (default auto)`;

/** Converts validated recording options to reader options. */
export function toReadOptions(values: {
  rate?: number;
  setup?: string;
  start?: number;
  end?: number;
  delimiter?: "auto" | "comma" | "semicolon" | "tab";
  decimal?: "auto" | "point" | "comma";
}): ReadRecordingOptions {
  const delimiters = { auto: "auto", comma: ",", semicolon: ";", tab: "\t" } as const;
  const decimals = { auto: "auto", point: ".", comma: "," } as const;
  return {
    ...(values.rate !== undefined ? { rate: values.rate } : {}),
    ...(values.setup !== undefined ? { setup: values.setup } : {}),
    ...(values.start !== undefined ? { start: values.start } : {}),
    ...(values.end !== undefined ? { end: values.end } : {}),
    delimiter: delimiters[values.delimiter ?? "auto"],
    decimal: decimals[values.decimal ?? "auto"],
  };
}

/**
 * Opens the recording for chunked reading and runs the analysis on it. The
 * analysis decides whether it reads in chunks or collects the whole record;
 * a fault is reported once, where the reader finds it.
 */
export async function analyseRecording<T>(
  input: string,
  options: ReadRecordingOptions,
  analysis: (stream: RecordingStream) => Promise<T>,
): Promise<T> {
  const stream = await openRecordingStream(input, options);
  return await inFileAsync(input, () => analysis(stream));
}
