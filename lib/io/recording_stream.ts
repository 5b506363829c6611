/**
 * The one way quiver reads a recording: opened for chunked reading (header
 * first: rate, channels, length), then read chunk by chunk into an analysis,
 * so that an analysis that can run on chunks needs memory for one chunk
 * only, however long the recording. An analysis that needs the whole record
 * reads it through the same chunks into arrays sized from the header
 * ({@linkcode collectRecording}).
 *
 * WAV: the header is read, then the data chunk frame block by frame block.
 * CSV: the one CSV reader (csv_engine.ts) in two passes over the bytes. A
 * fault is reported where it is found, with file, line and column; nothing
 * is read twice to find it.
 *
 * @module
 */
import { resolve } from "node:path";
import { open } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { type ChannelTransform, parseChannelSetup, setupTransforms } from "./channel_setup.ts";
import { changedWhileRead, CsvRowParser, CsvScanner } from "./csv_engine.ts";
import { csvRecordingLayout, TimeStepCheck } from "./csv_recording.ts";
import type { ReadRecordingOptions } from "./read_recording.ts";
import type { ChannelRole, ConverterScale, Recording } from "./recording.ts";
import {
  decodeWavFrames,
  FORMAT_FLOAT,
  looksLikeWav,
  parseWav,
  refuseNonFiniteSamples,
} from "./wav.ts";
import { ChannelStatistics } from "./signal_checks.ts";
import { assertRegularFile } from "./file_kinds.ts";
import { readFile } from "node:fs/promises";

/** A recording opened for chunked reading. */
export interface RecordingStream {
  /** Sample rate, Hz. */
  readonly rate: number;
  /** Time of the first sample, s. */
  readonly startTime: number;
  /** Samples per channel. */
  readonly length: number;
  /** The channels after the set-up (names, units, roles). */
  readonly channels: readonly {
    name: string;
    unit: string;
    role?: ChannelRole;
    /** The converter's rails in the channel's unit, when known (integer PCM WAV, a set-up range). */
    fullScale?: ConverterScale;
  }[];
  /**
   * Reads the channels with the given indices in order, chunk by chunk.
   * A chunk's arrays are valid during the callback only: they are reused.
   *
   * @throws {QuiverError} for a fault in the data, naming file, line and column.
   */
  read(selected: readonly number[], onChunk: (chunk: Float64Array[]) => void): Promise<void>;
}

/** Rows (frames) per chunk. */
export const CHUNK_ROWS = 65536;
const READ_BYTES = 1 << 20;

async function transformsFor(
  channels: { name: string; unit: string }[],
  options: ReadRecordingOptions,
): Promise<ChannelTransform[]> {
  // Without a set-up the transforms still convert units to their SI base (units.ts).
  if (options.setup === undefined) return setupTransforms(channels, { channels: {} });
  assertRegularFile(options.setup, "channel set-up");
  let text: string;
  try {
    text = await readFile(options.setup, "utf8");
  } catch (error) {
    throw unreadable(options.setup, error);
  }
  return setupTransforms(channels, parseChannelSetup(text, options.setup), options.setup);
}

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

async function openCsvStream(
  path: string,
  options: ReadRecordingOptions,
): Promise<RecordingStream> {
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
  const transforms = await transformsFor(channelColumns.map((i) => header[i]), options);
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

async function openWavStream(
  path: string,
  options: ReadRecordingOptions,
): Promise<RecordingStream> {
  const handle = await open(path, "r");
  try {
    const size = (await handle.stat()).size;
    const head = new Uint8Array(Math.min(size, 1 << 20));
    await handle.read(head, 0, head.length, 0);
    if (!looksLikeWav(head)) parseWav(head, path); // throws its precise message
    const view = new DataView(head.buffer);
    let offset = 12;
    let fmt:
      | { code: number; channels: number; rate: number; blockAlign: number; bits: number }
      | undefined;
    let dataStart = -1;
    let dataBytes = 0;
    while (offset + 8 <= head.length) {
      const id = String.fromCharCode(...head.subarray(offset, offset + 4));
      const chunkSize = view.getUint32(offset + 4, true);
      if (id === "data") {
        dataStart = offset + 8;
        dataBytes = chunkSize;
        break;
      }
      if (id === "fmt " && offset + 8 + 16 <= head.length) {
        let code = view.getUint16(offset + 8, true);
        if (code === 0xfffe && offset + 8 + 26 <= head.length) {
          code = view.getUint16(offset + 8 + 24, true);
        }
        fmt = {
          code,
          channels: view.getUint16(offset + 10, true),
          rate: view.getUint32(offset + 12, true),
          blockAlign: view.getUint16(offset + 20, true),
          bits: view.getUint16(offset + 22, true),
        };
      }
      offset += 8 + chunkSize + (chunkSize % 2);
    }
    const fail = (detail: string, kind: "data" | "usage" = "data"): never => {
      throw new QuiverError(detail, { file: path }, kind);
    };
    if (fmt === undefined || dataStart < 0) {
      parseWav(head, path); // a missing or misplaced chunk: its precise message
      fail("no fmt and data chunks in the first MiB of the file");
    }
    const format = fmt as NonNullable<typeof fmt>;
    if (dataStart + dataBytes > size) {
      fail(
        `truncated: the data chunk declares ${dataBytes} bytes but the file holds ${
          size - dataStart
        } after its header`,
      );
    }
    if (format.blockAlign === 0 || dataBytes % format.blockAlign !== 0) {
      fail(
        `data chunk of ${dataBytes} bytes is not a whole number of ${format.blockAlign}-byte frames`,
      );
    }
    if (options.rate !== undefined) {
      fail("a WAV file states its own sample rate; do not give one", "usage");
    }
    if (options.timeColumn !== undefined) {
      fail("a WAV file has no time column; do not name one (--time-column)", "usage");
    }
    const f = format;
    // Validate the format with the in-memory decoder on a header-only copy.
    const probe = new Uint8Array(dataStart + f.blockAlign);
    probe.set(head.subarray(0, dataStart));
    new DataView(probe.buffer).setUint32(dataStart - 4, f.blockAlign, true);
    const decoded = parseWav(probe, path);
    const frames = dataBytes / f.blockAlign;
    const transforms = await transformsFor(
      decoded.channels.map((c) => ({ name: c.name, unit: c.unit })),
      options,
    );
    return {
      rate: f.rate,
      startTime: 0,
      length: frames,
      channels: transforms.map(({ factor, ...meta }) => {
        if (f.code === FORMAT_FLOAT) return meta;
        // Integer PCM reads as code / 2^(bits−1): its rails are the extreme codes, scaled alike.
        const lsb = 2 ** (1 - f.bits);
        return {
          ...meta,
          fullScale: { low: -factor, high: (1 - lsb) * factor, step: lsb * factor },
        };
      }),
      async read(selected, onChunk) {
        const h = await open(path, "r");
        try {
          // One byte buffer and one sample array per channel, reused for every chunk.
          const rows = Math.min(CHUNK_ROWS, frames);
          const bytes = new Uint8Array(rows * f.blockAlign);
          const view = new DataView(bytes.buffer);
          const samples = Array.from({ length: f.channels }, () => new Float64Array(rows));
          const factors = selected.map((s) => transforms[s].factor);
          for (let first = 0; first < frames; first += CHUNK_ROWS) {
            const count = Math.min(CHUNK_ROWS, frames - first);
            await h.read(bytes, 0, count * f.blockAlign, dataStart + first * f.blockAlign);
            decodeWavFrames(view, { start: 0, count, format: f, out: samples });
            if (f.code === FORMAT_FLOAT) refuseNonFiniteSamples(samples, count, first, path);
            onChunk(selected.map((s, j) => {
              const d = samples[s].subarray(0, count);
              if (factors[j] !== 1) { for (let i = 0; i < d.length; i++) d[i] *= factors[j]; }
              return d;
            }));
          }
        } finally {
          await h.close();
        }
      },
    };
  } finally {
    await handle.close();
  }
}

/**
 * Reads the channels with the given indices through `onChunk` and returns
 * their signal warnings (signal_checks.ts). The statistics see each chunk
 * before `onChunk`, which may then change it in place.
 *
 * @throws {QuiverError} as {@linkcode RecordingStream.read} does.
 */
export async function readChecked(
  stream: RecordingStream,
  indices: readonly number[],
  onChunk: (chunk: Float64Array[]) => void,
): Promise<string[]> {
  const statistics = indices.map((i) => new ChannelStatistics(stream.channels[i].fullScale));
  await stream.read(indices, (chunk) => {
    chunk.forEach((c, i) => statistics[i].push(c));
    onChunk(chunk);
  });
  return indices.flatMap((channel, i) => statistics[i].warnings(stream.channels[channel]));
}

/**
 * Opens a recording (CSV or WAV, told by its first bytes) for chunked reading,
 * with the set-up applied.
 *
 * @throws {QuiverError} for a missing file, one that is not a regular file
 * (a folder, FIFO or device: refused before it is opened, so a FIFO cannot
 * hang the read), a bad header or set-up, or (CSV) any fault pass 1 finds.
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
  assertRegularFile(path, "recording");
  let magic: Uint8Array;
  try {
    const h = await open(path, "r");
    try {
      magic = new Uint8Array(12);
      await h.read(magic, 0, 12, 0);
    } finally {
      await h.close();
    }
  } catch (error) {
    throw unreadable(path, error);
  }
  const stream = looksLikeWav(magic)
    ? await openWavStream(path, options)
    : await openCsvStream(path, options);
  return options.start === undefined && options.end === undefined
    ? stream
    : sliceStream(stream, options.start, options.end, path);
}

/**
 * The samples of `stream` whose times t = startTime + i/rate lie in
 * [start, end): a time slice, read through the same chunks.
 *
 * @throws {QuiverError} (usage) for a slice that is empty or reaches outside
 * the record, naming both.
 *
 * @example
 * ```ts
 * import { recordingSource, sliceStream } from "./recording_stream.ts";
 * const data = new Float64Array(100).map((_, i) => i);
 * const s = sliceStream(recordingSource({ rate: 10, startTime: 0, channels: [{ name: "a", unit: "V", data }] }), 2, 3.5);
 * const seen: number[] = [];
 * await s.read([0], ([c]) => seen.push(...c));
 * if (s.length !== 15 || s.startTime !== 2 || seen[0] !== 20 || seen[14] !== 34) throw new Error();
 * ```
 */
export function sliceStream(
  stream: RecordingStream,
  start: number | undefined,
  end: number | undefined,
  file?: string,
): RecordingStream {
  const { rate, startTime, length } = stream;
  const recordEnd = startTime + length / rate;
  const from = start ?? startTime, to = end ?? recordEnd;
  const span = `the record spans ${formatNumber(startTime, 8)}–${formatNumber(recordEnd, 8)} s`;
  const fail = (detail: string): never => {
    throw new QuiverError(detail, { file }, "usage");
  };
  if (!(to > from)) fail(`the slice ${from}–${to} s is empty`);
  // Half a sample of slack: times written to the file's precision still count as inside.
  const slack = 0.5 / rate;
  if (from < startTime - slack || to > recordEnd + slack) {
    fail(`the slice ${from}–${to} s reaches outside the record: ${span}`);
  }
  const first = Math.max(0, Math.ceil((from - startTime) * rate - 1e-9));
  const last = Math.min(length, Math.ceil((to - startTime) * rate - 1e-9)); // exclusive
  if (last <= first) fail(`the slice ${from}–${to} s holds no sample: ${span}`);
  return {
    rate,
    startTime: startTime + first / rate,
    length: last - first,
    channels: stream.channels,
    async read(selected, onChunk) {
      let at = 0; // index of the chunk's first sample in the whole record
      await stream.read(selected, (chunk) => {
        const n = chunk[0]?.length ?? 0;
        const a = Math.max(first, at), b = Math.min(last, at + n);
        if (b > a) onChunk(chunk.map((c) => c.subarray(a - at, b - at)));
        at += n;
      });
    },
  };
}

/** The usage error for a file that cannot be opened. */
export function unreadable(path: string, error: unknown): QuiverError {
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
  return new QuiverError(`cannot read: ${why}`, { file: resolve(path) }, "usage");
}

/**
 * The whole recording from a stream, in arrays sized from its header (for
 * analyses that need the whole record), with the channels at `selected`
 * (default: all).
 *
 * @example
 * ```ts
 * import { collectRecording, openRecordingStream } from "./recording_stream.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/r.csv`, "time_s,a [V]\n0,1\n0.5,2\n1,3\n");
 * const rec = await collectRecording(await openRecordingStream(`${dir}/r.csv`));
 * if (rec.rate !== 2 || rec.channels[0].data[2] !== 3) throw new Error();
 * ```
 */
export async function collectRecording(
  stream: RecordingStream,
  selected?: readonly number[],
): Promise<Recording> {
  const indices = selected ?? stream.channels.map((_, i) => i);
  const data = indices.map(() => new Float64Array(stream.length));
  let at = 0;
  await stream.read(indices, (chunk) => {
    chunk.forEach((c, j) => data[j].set(c, at));
    at += chunk[0]?.length ?? 0;
  });
  return {
    rate: stream.rate,
    startTime: stream.startTime,
    channels: indices.map((i, j) => ({ ...stream.channels[i], data: data[j] })),
  };
}

/** What an analysis reads: a recording opened from a file, or one held in memory. */
export type RecordingSource = RecordingStream | Recording;

/**
 * A recording held in memory as a stream: the simplest source. Its chunks are
 * copies in reused buffers, as a file's are, so an analysis that works on a
 * chunk in place never changes the recording.
 *
 * @throws {RangeError} for channels of different lengths.
 *
 * @example
 * ```ts
 * import { recordingSource } from "./recording_stream.ts";
 * const s = recordingSource({ rate: 10, startTime: 0, channels: [{ name: "a", unit: "V", data: new Float64Array(5).fill(2) }] });
 * let sum = 0;
 * await s.read([0], (chunk) => { for (const v of chunk[0]) sum += v; chunk[0].fill(0); });
 * if (s.length !== 5 || sum !== 10) throw new Error();
 * ```
 */
export function recordingSource(recording: Recording): RecordingStream {
  const length = recording.channels[0]?.data.length ?? 0;
  if (recording.channels.some((c) => c.data.length !== length)) {
    throw new RangeError("every channel of a recording must have the same length");
  }
  return {
    rate: recording.rate,
    startTime: recording.startTime,
    length,
    channels: recording.channels.map(({ data: _d, ...meta }) => meta),
    read(selected, onChunk) {
      const rows = Math.min(CHUNK_ROWS, length);
      const buffers = selected.map(() => new Float64Array(rows));
      for (let first = 0; first < length; first += CHUNK_ROWS) {
        const count = Math.min(CHUNK_ROWS, length - first);
        onChunk(selected.map((s, j) => {
          const b = buffers[j].subarray(0, count);
          b.set(recording.channels[s].data.subarray(first, first + count));
          return b;
        }));
      }
      return Promise.resolve();
    },
  };
}

/** The source as a stream (a recording in memory through {@linkcode recordingSource}). */
export function asStream(source: RecordingSource): RecordingStream {
  return "read" in source ? source : recordingSource(source);
}
