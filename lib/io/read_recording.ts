/**
 * Opens a recording file of either kind: WAV when the bytes start with a
 * RIFF/WAVE header, otherwise UTF-8 CSV text. A channel set-up, when given,
 * is applied straight after reading.
 *
 * @module
 */
import { readFile } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { notUtf8Text } from "./text_encoding.ts";
import { applyChannelSetup, parseChannelSetup } from "./channel_setup.ts";
import { type CsvReadOptions, parseCsvRecording } from "./csv_reader.ts";
import type { Recording } from "./recording.ts";
import { looksLikeWav, parseWav } from "./wav.ts";

/** Options of {@linkcode readRecordingFile}. */
export interface ReadRecordingOptions extends Omit<CsvReadOptions, "file"> {
  /** Path of a channel set-up JSON file. Default: none. */
  setup?: string;
}

async function readBytes(path: string): Promise<Uint8Array> {
  try {
    return await readFile(path);
  } catch (error) {
    const code = (error as { code?: string }).code;
    const why = code === "ENOENT"
      ? "no such file"
      : code === "EISDIR"
      ? "is a folder, not a file"
      : code === "EACCES"
      ? "permission denied"
      : error instanceof Error
      ? error.message
      : String(error);
    throw new QuiverError(`cannot read: ${why}`, { file: path }, "usage");
  }
}

/**
 * Reads a CSV or WAV recording and applies an optional channel set-up.
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
  const bytes = await readBytes(path);
  let recording: Recording;
  if (looksLikeWav(bytes)) {
    if (options.rate !== undefined) {
      throw new QuiverError(
        "a WAV file states its own sample rate; do not give one",
        { file: path },
        "usage",
      );
    }
    recording = parseWav(bytes, path);
  } else {
    let text: string;
    try {
      text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
    } catch {
      throw notUtf8Text(path);
    }
    recording = parseCsvRecording(text, { ...options, file: path });
  }
  // Without a set-up the channels still go to their SI base units (units.ts).
  if (options.setup === undefined) return applyChannelSetup(recording, { channels: {} });
  const setupText = new TextDecoder().decode(await readBytes(options.setup));
  return applyChannelSetup(
    recording,
    parseChannelSetup(setupText, options.setup),
    options.setup,
  );
}
