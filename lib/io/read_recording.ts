/**
 * A recording file read whole into memory, through the one reading path
 * (recording_stream.ts): opened (CSV or WAV, told by its first bytes, with
 * the set-up applied), then read chunk by chunk into arrays sized from its
 * header.
 *
 * @module
 */
import type { CsvReadOptions } from "./csv_recording.ts";
import type { Recording } from "./recording.ts";
import { collectRecording, openRecordingStream } from "./recording_stream.ts";

/** Options of {@linkcode readRecordingFile}. */
export interface ReadRecordingOptions extends Omit<CsvReadOptions, "file"> {
  /** Path of a channel set-up JSON file. Default: none. */
  setup?: string;
  /** Start of the stretch to read, s on the recording's own time axis. Default: its start. */
  start?: number;
  /** End of the stretch to read (exclusive), s. Default: its end. */
  end?: number;
}

/**
 * Reads a CSV or WAV recording with an optional channel set-up.
 *
 * @throws {QuiverError} for unreadable files and bad content.
 *
 * @example
 * ```ts
 * import { readRecordingFile } from "./read_recording.ts";
 * import { writeFile, mkdtemp } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/r.csv`, "a,b\n1,2\n3,4\n");
 * const rec = await readRecordingFile(`${dir}/r.csv`, { rate: 100 });
 * if (rec.channels.length !== 2) throw new Error();
 * ```
 */
export async function readRecordingFile(
  path: string,
  options: ReadRecordingOptions = {},
): Promise<Recording> {
  return await collectRecording(await openRecordingStream(path, options));
}
