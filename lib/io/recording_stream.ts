/**
 * The one way quiver reads a recording file: its format told by its first
 * bytes from the one list of formats (formats/mod.ts), opened for chunked
 * reading with the set-up applied (header first: rate, channels, length),
 * then cut to the time slice asked for. What a stream is, a recording in
 * memory as one, slicing and collecting: recording_source.ts, re-exported
 * here with it.
 *
 * @module
 */
import { stat } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { sniffRecording } from "./formats/mod.ts";
import type { ReadRecordingOptions } from "./formats/format.ts";
import { type RecordingStream, sliceStream } from "./recording_source.ts";

export {
  asStream,
  CHUNK_ROWS,
  collectRecording,
  readChecked,
  type RecordingSource,
  recordingSource,
  type RecordingStream,
  sliceStream,
} from "./recording_source.ts";
export { unreadable } from "./file_kinds.ts";

/**
 * Opens a recording (of a format in formats/mod.ts, told by its first
 * bytes) for chunked reading, with the set-up applied and cut to
 * `options.start`–`options.end` when given.
 *
 * @throws {QuiverError} for a missing file, one that is not a regular file
 * (a folder, FIFO or device: refused before it is opened, so a FIFO cannot
 * hang the read), a file of no format quiver reads, a bad header or set-up,
 * (CSV) any fault pass 1 finds, or a slice outside the record.
 *
 * @example
 * ```ts
 * import { openRecordingStream } from "./recording_stream.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/r.csv`, "time_s,acc [g]\n0,1\n0.001,2\n0.002,3\n");
 * const s = await openRecordingStream(`${dir}/r.csv`);
 * let sum = 0;
 * await s.read([0], ([chunk]) => { for (const v of chunk) sum += v; });
 * // Read in m/s^2: (1 + 2 + 3) g × 9.80665 (ISO 80000-3).
 * if (s.rate !== 1000 || s.channels[0].unit !== "m/s^2" || Math.abs(sum - 6 * 9.80665) > 1e-12) throw new Error();
 * ```
 */
export async function openRecordingStream(
  path: string,
  options: ReadRecordingOptions = {},
): Promise<RecordingStream> {
  const format = await sniffRecording(path);
  const { start, end, ...formatOptions } = options;
  // The files' state before they are parsed: a change after it shows when opened again.
  const files = format.opensAgain === true ? await fileStates(path, options.setup) : undefined;
  const stream = await format.open(path, formatOptions);
  const sliced = start === undefined && end === undefined
    ? stream
    : sliceStream(stream, start, end, path);
  if (files !== undefined) recipes.set(sliced, { path, options: { ...options }, files });
  return sliced;
}

/** The recording's and the set-up's size and time of change. */
async function fileStates(path: string, setup: string | undefined): Promise<FileState[]> {
  return await Promise.all([path, ...(setup === undefined ? [] : [setup])].map(async (p) => {
    const { size, mtimeMs } = await stat(p);
    return { path: p, size, mtimeMs };
  }));
}

/** A file's size and time of change when it was read. */
export interface FileState {
  readonly path: string;
  readonly size: number;
  readonly mtimeMs: number;
}

/**
 * How another thread opens a stream again: the file, the options it was
 * opened with, and the size and time of change of the recording and its
 * set-up before they were first read (a file changed in between is
 * refused, not read as another record).
 */
export interface StreamRecipe {
  readonly path: string;
  readonly options: ReadRecordingOptions;
  readonly files: readonly FileState[];
}

/**
 * The recipes of streams that {@linkcode openRecordingStream} opened from a
 * file of a format that opens again cheaply (`opensAgain`: WAV), by the
 * stream object itself: a stream made from one (a wrapper that changes its
 * samples) is another object and has none. Other formats have none: a CSV
 * file's parse is most of the work and would be done twice; an MDF 4 file
 * read again by a worker was slower than the ring (measured).
 */
const recipes = new WeakMap<RecordingStream, StreamRecipe>();

/**
 * How to open `stream` again in another thread, when it was opened by
 * {@linkcode openRecordingStream} from a file of a format that opens again
 * cheaply (WAV); otherwise undefined.
 * Reading a subset of its channels from the reopened stream gives the same
 * samples, chunk for chunk, as from `stream`.
 *
 * @example
 * ```ts
 * import { recordingSource, streamRecipe } from "./recording_stream.ts";
 * const s = recordingSource({ rate: 10, startTime: 0, channels: [{ name: "a", unit: "V", data: new Float64Array(4) }] });
 * if (streamRecipe(s) !== undefined) throw new Error();
 * ```
 */
export function streamRecipe(stream: RecordingStream): StreamRecipe | undefined {
  return recipes.get(stream);
}

/**
 * Opens the stream a {@linkcode StreamRecipe} describes.
 *
 * @throws {QuiverError} when the recording's or the set-up's size or time
 * of change differ from the recipe's, naming the file, and as
 * {@linkcode openRecordingStream} does.
 *
 * @example
 * ```ts
 * import { openRecordingStream, reopenRecordingStream, streamRecipe } from "./recording_stream.ts";
 * import { encodeWav } from "./wav.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const data = new Float64Array(64).map((_, i) => Math.sin(i));
 * await writeFile(`${dir}/r.wav`, encodeWav({ rate: 8000, startTime: 0, channels: [{ name: "a", unit: "FS", data }] }, "float32"));
 * const again = await reopenRecordingStream(streamRecipe(await openRecordingStream(`${dir}/r.wav`))!);
 * if (again.length !== 64 || again.rate !== 8000) throw new Error();
 * ```
 */
export async function reopenRecordingStream(recipe: StreamRecipe): Promise<RecordingStream> {
  const stream = await openRecordingStream(recipe.path, recipe.options);
  const now = await fileStates(recipe.path, recipe.options.setup);
  recipe.files.forEach((then, i) => {
    if (now[i].size !== then.size || now[i].mtimeMs !== then.mtimeMs) {
      throw new QuiverError("the file changed while it was read", { file: then.path });
    }
  });
  return stream;
}
