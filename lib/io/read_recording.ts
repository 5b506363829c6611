/**
 * A recording file read whole into memory, through the one reading path
 * (recording_stream.ts): opened (its format told by its first bytes, with
 * the set-up applied), then read chunk by chunk into arrays sized from its
 * header.
 *
 * @module
 */
import type { Recording } from "./recording.ts";
import type { ReadRecordingOptions } from "./formats/format.ts";
import { collectRecording } from "./recording_source.ts";
import { openRecordingStream } from "./recording_stream.ts";

export type { ReadRecordingOptions } from "./formats/format.ts";

/**
 * Reads a recording (any format of formats/mod.ts) with an optional channel set-up.
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
