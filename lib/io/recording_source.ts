/**
 * A recording read chunk by chunk ({@linkcode RecordingStream}): the header
 * first (rate, channels, length), then the samples chunk by chunk into an
 * analysis, so that an analysis that can run on chunks needs memory for one
 * chunk only, however long the recording. Every file format opens a file as
 * such a stream (formats/); a recording held in memory is the simplest one
 * ({@linkcode recordingSource}). Written once here, above the formats: a
 * time slice ({@linkcode sliceStream}), the whole record collected into
 * arrays sized from the header ({@linkcode collectRecording}), and reading
 * with the signal checks ({@linkcode readChecked}).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import type { ChannelRole, ConverterScale, Recording } from "./recording.ts";
import { ChannelStatistics } from "./signal_checks.ts";

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
 * The samples of `stream` whose times t = startTime + i/rate lie in
 * [start, end): a time slice, read through the same chunks.
 *
 * @throws {QuiverError} (usage) for a slice that is empty or reaches outside
 * the record, naming both.
 *
 * @example
 * ```ts
 * import { recordingSource, sliceStream } from "./recording_source.ts";
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

/**
 * The whole recording from a stream, in arrays sized from its header (for
 * analyses that need the whole record), with the channels at `selected`
 * (default: all).
 *
 * @example
 * ```ts
 * import { collectRecording, recordingSource } from "./recording_source.ts";
 * const data = new Float64Array(200000).map((_, i) => i);
 * const rec = await collectRecording(recordingSource({ rate: 2, startTime: 0, channels: [{ name: "a", unit: "V", data }] }));
 * if (rec.rate !== 2 || rec.channels[0].data[150000] !== 150000 || rec.channels[0].data === data) throw new Error();
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
 * import { recordingSource } from "./recording_source.ts";
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
