/**
 * The options every command that reads a recording shares.
 *
 * @module
 */
import { z } from "zod";
import { readRecordingFile, type ReadRecordingOptions } from "../lib/io/read_recording.ts";
import {
  openRecordingStream,
  type RecordingStream,
  StreamFallback,
} from "../lib/io/recording_stream.ts";
import type { Recording } from "../lib/io/recording.ts";
import { QuiverError } from "../lib/errors.ts";
import { inFile, inFileAsync, numberOption, type OptionSpec } from "./args.ts";

/** parseArgs spec of the recording options. */
export const RECORDING_OPTIONS: OptionSpec = {
  rate: { type: "string" },
  setup: { type: "string" },
  delimiter: { type: "string" },
  decimal: { type: "string" },
};

/** zod shape of the recording options. */
export const recordingOptionsShape = {
  rate: numberOption().pipe(z.number().positive("must be a positive number of Hz")).optional(),
  setup: z.string().optional(),
  delimiter: z.enum(["auto", "comma", "semicolon", "tab"]).optional(),
  decimal: z.enum(["auto", "point", "comma"]).optional(),
};

/** Help lines for the recording options. */
export const RECORDING_HELP = `Reading the recording:
  --rate HZ            sample rate, needed when the CSV has no time_s/time column
                       (checked against the column when it has one; WAV states its own)
  --setup FILE.json    channel set-up: units, sensitivities, roles (README.md,
                       "Channel set-up")
  --delimiter D        auto | comma | semicolon | tab            (default auto)
  --decimal M          auto | point | comma                      (default auto)`;

/** Converts validated recording options to reader options. */
export function toReadOptions(values: {
  rate?: number;
  setup?: string;
  delimiter?: "auto" | "comma" | "semicolon" | "tab";
  decimal?: "auto" | "point" | "comma";
}): ReadRecordingOptions {
  const delimiters = { auto: "auto", comma: ",", semicolon: ";", tab: "\t" } as const;
  const decimals = { auto: "auto", point: ".", comma: "," } as const;
  return {
    ...(values.rate !== undefined ? { rate: values.rate } : {}),
    ...(values.setup !== undefined ? { setup: values.setup } : {}),
    delimiter: delimiters[values.delimiter ?? "auto"],
    decimal: decimals[values.decimal ?? "auto"],
  };
}

/**
 * Runs an analysis on the recording read in chunks when the file allows it,
 * else (or when the chunked path refuses anything) on the whole file, whose
 * reader then reports the first fault in file order. Both give the same numbers.
 */
export async function analyseRecording<T>(
  input: string,
  options: ReadRecordingOptions,
  streamed: (stream: RecordingStream) => Promise<T>,
  whole: (recording: Recording) => T,
): Promise<T> {
  try {
    const stream = await openRecordingStream(input, options);
    return await inFileAsync(input, () => streamed(stream));
  } catch (error) {
    const refusal = error instanceof StreamFallback || error instanceof QuiverError ||
      error instanceof RangeError;
    if (!refusal) throw error;
    const recording = await readRecordingFile(input, options);
    return inFile(input, () => whole(recording));
  }
}
