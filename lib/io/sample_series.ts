/**
 * One channel's samples for an analysis that needs the whole record (hit
 * detection, tacho pulses, angle resampling) without holding it in memory:
 * a recording read through the chunked reader is spooled once to a
 * temporary file of raw float64 samples and read back by ranges; a
 * recording already in memory is used as it is. Memory stays flat in the
 * record's length; the spool lives in the system's temporary folder and is
 * removed when the analysis closes it, also after an error.
 *
 * Order statistics (median, percentiles) of a series are exact
 * ({@linkcode kthSmallest}): successive histograms narrow the range that
 * holds the k-th value until it can be sorted in memory, so they equal what
 * a sort of the whole record gives.
 *
 * @module
 */
import { closeSync, mkdtempSync, openSync, readSync, rmSync, writeSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { RecordingSource, RecordingStream } from "./recording_stream.ts";
import { ChannelStatistics, channelWarnings } from "./signal_checks.ts";

/** Samples read back in chunks while a series is scanned. */
export const SERIES_CHUNK = 1 << 16;

/** One channel's samples, read by ranges or scanned chunk by chunk. */
export interface SampleSeries {
  /** Number of samples. */
  readonly length: number;
  /**
   * Samples [from, to) (clipped to the series). The array may be a view of
   * the series (in memory) or a new array (spooled); do not change it.
   */
  read(from: number, to: number): Float64Array;
  /**
   * Copies samples [from, from + target.length) into `target`, which must
   * lie inside the series: reading many records without allocating.
   */
  readInto(target: Float64Array, from: number): void;
  /** Calls `visit` with consecutive chunks and the index of each chunk's first sample. */
  scan(visit: (chunk: Float64Array, offset: number) => void): void;
  /**
   * The smallest and largest sample, all samples being finite, when known
   * without a pass over them (a spool learns it while writing). Default:
   * not known.
   */
  readonly extent?: readonly [number, number];
}

/**
 * A series over an array in memory.
 *
 * @example
 * ```ts
 * import { memorySeries } from "./sample_series.ts";
 * const s = memorySeries(new Float64Array([1, 2, 3, 4]));
 * let sum = 0;
 * s.scan((chunk) => { for (const v of chunk) sum += v; });
 * if (sum !== 10 || s.read(1, 3).join() !== "2,3") throw new Error();
 * ```
 */
export function memorySeries(data: Float64Array): SampleSeries {
  return {
    length: data.length,
    read: (from, to) => data.subarray(Math.max(0, from), Math.min(data.length, to)),
    readInto(target, from) {
      target.set(data.subarray(from, from + target.length));
    },
    scan(visit) {
      for (let at = 0; at < data.length; at += SERIES_CHUNK) {
        visit(data.subarray(at, Math.min(data.length, at + SERIES_CHUNK)), at);
      }
    },
  };
}

/** Spooled channels: their series, their signal warnings, and how to remove the spool. */
export interface Spool {
  /** One series per channel asked for, in that order. */
  readonly series: readonly SampleSeries[];
  /** The signal checks' warnings per channel (signal_checks.ts). */
  readonly warnings: readonly string[][];
  /** Removes the temporary files. Safe to call twice. */
  close(): void;
}

/**
 * Reads the channels once through the stream into temporary files of raw
 * float64 samples, checking each channel's signal on the way.
 *
 * @throws {QuiverError} for a fault the reader finds, naming file, line and column.
 *
 * @example
 * ```ts
 * import { spoolChannels } from "./sample_series.ts";
 * import { recordingSource } from "./recording_stream.ts";
 * const data = new Float64Array(100_000).map((_, i) => i);
 * const spool = await spoolChannels(recordingSource({ rate: 10, startTime: 0, channels: [{ name: "a", unit: "V", data }] }), [0]);
 * try {
 *   if (spool.series[0].length !== 100_000 || spool.series[0].read(70_000, 70_002).join() !== "70000,70001") throw new Error();
 * } finally {
 *   spool.close();
 * }
 * ```
 */
export async function spoolChannels(
  stream: RecordingStream,
  indices: readonly number[],
): Promise<Spool> {
  const dir = mkdtempSync(join(tmpdir(), "quiver-spool-"));
  const descriptors: number[] = [];
  let closed = false;
  const close = () => {
    if (closed) return;
    closed = true;
    for (const fd of descriptors) closeSync(fd);
    rmSync(dir, { recursive: true, force: true });
  };
  try {
    indices.forEach((_, j) => descriptors.push(openSync(join(dir, `${j}.f64`), "w+")));
    const statistics = indices.map((i) => new ChannelStatistics(stream.channels[i].fullScale));
    let length = 0;
    await stream.read(indices, (chunk) => {
      chunk.forEach((values, j) => {
        statistics[j].push(values);
        writeSync(
          descriptors[j],
          new Uint8Array(values.buffer, values.byteOffset, values.byteLength),
        );
      });
      length += chunk[0]?.length ?? 0;
    });
    const series = descriptors.map((fd, j) => fileSeries(fd, length, statistics[j].extent));
    const warnings = indices.map((channel, j) => statistics[j].warnings(stream.channels[channel]));
    return { series, warnings, close };
  } catch (error) {
    close();
    throw error;
  }
}

function fileSeries(
  fd: number,
  length: number,
  extent: readonly [number, number] | undefined,
): SampleSeries {
  const readInto = (target: Float64Array, from: number) => {
    const bytes = new Uint8Array(target.buffer, target.byteOffset, target.byteLength);
    let done = 0;
    while (done < bytes.length) {
      const got = readSync(fd, bytes, done, bytes.length - done, from * 8 + done);
      if (got === 0) throw new Error("the spool file ended early");
      done += got;
    }
  };
  const buffer = new Float64Array(Math.min(SERIES_CHUNK, length));
  return {
    length,
    ...(extent !== undefined ? { extent } : {}),
    readInto(target, from) {
      if (from < 0 || from + target.length > length) {
        throw new RangeError(
          `samples ${from}–${from + target.length - 1} lie outside the ${length}`,
        );
      }
      readInto(target, from);
    },
    read(from, to) {
      const a = Math.max(0, from), b = Math.min(length, to);
      const out = new Float64Array(Math.max(0, b - a));
      if (out.length > 0) readInto(out, a);
      return out;
    },
    scan(visit) {
      for (let at = 0; at < length; at += SERIES_CHUNK) {
        const chunk = buffer.subarray(0, Math.min(SERIES_CHUNK, length - at));
        readInto(chunk, at);
        visit(chunk, at);
      }
    },
  };
}

/**
 * Runs `use` on the channels of a source as series: a recording in memory
 * as it is, one read from a file spooled once (and the spool removed after
 * `use`, also when it throws). `warnings[j]` are channel j's signal checks.
 *
 * @example
 * ```ts
 * import { withChannelSeries } from "./sample_series.ts";
 * import { recordingSource } from "./recording_stream.ts";
 * const rec = { rate: 10, startTime: 0, channels: [{ name: "a", unit: "V", data: new Float64Array([1, 2, 3]) }] };
 * for (const source of [rec, recordingSource(rec)]) {
 *   const n = await withChannelSeries(source, [0], (series) => series[0].read(0, 3)[2]);
 *   if (n !== 3) throw new Error();
 * }
 * ```
 */
export async function withChannelSeries<T>(
  source: RecordingSource,
  indices: readonly number[],
  use: (series: readonly SampleSeries[], warnings: readonly string[][]) => T | Promise<T>,
): Promise<T> {
  if (!("read" in source)) {
    const channels = indices.map((i) => source.channels[i]);
    return await use(channels.map((c) => memorySeries(c.data)), channels.map(channelWarnings));
  }
  const spool = await spoolChannels(source, indices);
  try {
    return await use(spool.series, spool.warnings);
  } finally {
    spool.close();
  }
}

const BINS = 4096;
const SORT_LIMIT = 1 << 16;

/**
 * The k-th smallest (0-based) of `map(v)` over the series, exactly: the
 * value a numeric sort of the whole record would put at index k. Each pass
 * counts the values of the current range in 4096 bins and keeps the bin
 * that holds the k-th; once a bin holds few enough values (or one value),
 * they are sorted in memory.
 *
 * @throws {RangeError} for k outside the series, or a value that is not a
 * finite number.
 *
 * @example
 * ```ts
 * import { kthSmallest, memorySeries } from "./sample_series.ts";
 * const data = new Float64Array(100_001).map((_, i) => (i * 7919) % 100_001); // 0 … 100 000, shuffled
 * const s = memorySeries(data);
 * if (kthSmallest(s, 50_000) !== 50_000 || kthSmallest(s, 3, (v) => -v) !== -99_997) throw new Error();
 * ```
 */
export function kthSmallest(
  series: SampleSeries,
  k: number,
  map?: (value: number) => number,
): number {
  return kthSmallestOfMany(series, [k], map)[0];
}

/** One level of narrowing: the range [lo, lo + BINS·width) cut into bins, and the bin kept. */
interface Level {
  lo: number;
  width: number;
  bin: number;
}

function binOf(v: number, level: Level): number {
  return level.width > 0
    ? Math.min(BINS - 1, Math.max(0, Math.floor((v - level.lo) / level.width)))
    : (v > level.lo ? 1 : 0);
}

function inRange(v: number, levels: readonly Level[]): boolean {
  for (let l = 0; l < levels.length; l++) if (binOf(v, levels[l]) !== levels[l].bin) return false;
  return true;
}

/** Counts, minima and maxima per bin of the values inside `levels` (one pass). */
function histogram(
  series: SampleSeries,
  levels: readonly Level[],
  level: Level,
  map: ((value: number) => number) | undefined,
): { counts: Float64Array; mins: Float64Array; maxs: Float64Array } {
  const counts = new Float64Array(BINS);
  const mins = new Float64Array(BINS).fill(Infinity);
  const maxs = new Float64Array(BINS).fill(-Infinity);
  series.scan((chunk) => {
    for (let i = 0; i < chunk.length; i++) {
      const v = map === undefined ? chunk[i] : map(chunk[i]);
      if (levels.length > 0 && !inRange(v, levels)) continue;
      const b = binOf(v, level);
      counts[b]++;
      if (v < mins[b]) mins[b] = v;
      if (v > maxs[b]) maxs[b] = v;
    }
  });
  return { counts, mins, maxs };
}

/**
 * {@linkcode kthSmallest} for several ranks at once: the pass that finds the
 * range and the first histogram are shared, so two percentiles (or the two
 * middle values of an even-length median) cost little more than one.
 *
 * @throws {RangeError} as {@linkcode kthSmallest}.
 *
 * @example
 * ```ts
 * import { kthSmallestOfMany, memorySeries } from "./sample_series.ts";
 * const s = memorySeries(new Float64Array([5, 3, 9, 1, 7]));
 * const [a, b] = kthSmallestOfMany(s, [0, 4]);
 * if (a !== 1 || b !== 9) throw new Error();
 * ```
 */
export function kthSmallestOfMany(
  series: SampleSeries,
  ks: readonly number[],
  map?: (value: number) => number,
): number[] {
  for (const k of ks) {
    if (!Number.isInteger(k) || k < 0 || k >= series.length) {
      throw new RangeError(`k must be an index of the ${series.length} samples, got ${k}`);
    }
  }
  let lo = Infinity, hi = -Infinity;
  if (map === undefined && series.extent !== undefined) {
    [lo, hi] = series.extent; // known: no pass for the range
  } else {
    series.scan((chunk) => {
      for (let i = 0; i < chunk.length; i++) {
        const v = map === undefined ? chunk[i] : map(chunk[i]);
        if (!Number.isFinite(v)) {
          throw new RangeError(`order statistics need finite values, found ${v}`);
        }
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    });
  }
  if (lo === hi) return ks.map(() => lo);
  if (series.length <= SORT_LIMIT) {
    const sorted = sortedInRange(series, [], series.length, map);
    return ks.map((k) => sorted[k]);
  }
  const first: Level = { lo, width: (hi - lo) / BINS, bin: -1 };
  const shared = histogram(series, [], first, map);
  return ks.map((k) => {
    let b = 0, below = 0;
    while (below + shared.counts[b] <= k) below += shared.counts[b++];
    return narrow(series, k, {
      levels: [{ ...first, bin: b }],
      below,
      count: shared.counts[b],
      lo: shared.mins[b],
      hi: shared.maxs[b],
    }, map);
  });
}

/** The values inside `levels`, sorted (there must be exactly `count`). */
function sortedInRange(
  series: SampleSeries,
  levels: readonly Level[],
  count: number,
  map: ((value: number) => number) | undefined,
): Float64Array {
  const values = new Float64Array(count);
  let n = 0;
  series.scan((chunk) => {
    for (let i = 0; i < chunk.length; i++) {
      const v = map === undefined ? chunk[i] : map(chunk[i]);
      if (inRange(v, levels)) values[n++] = v;
    }
  });
  if (n !== count) throw new Error("the series changed between passes");
  return values.sort();
}

/** Narrows from a chosen bin until the k-th value is known. */
function narrow(
  series: SampleSeries,
  k: number,
  state: { levels: Level[]; below: number; count: number; lo: number; hi: number },
  map: ((value: number) => number) | undefined,
): number {
  let { below, count, lo, hi } = state;
  const levels = state.levels;
  for (;;) {
    if (lo === hi) return lo;
    if (count <= SORT_LIMIT) return sortedInRange(series, levels, count, map)[k - below];
    const level: Level = { lo, width: (hi - lo) / BINS, bin: -1 };
    const { counts, mins, maxs } = histogram(series, levels, level, map);
    let b = 0;
    while (below + counts[b] <= k) below += counts[b++];
    level.bin = b;
    levels.push(level);
    count = counts[b];
    lo = mins[b];
    hi = maxs[b];
  }
}

/**
 * The median of `map(v)` over the series, exactly as `medianOf` of the
 * whole record gives it (even length: the mean of the two middle values).
 *
 * @example
 * ```ts
 * import { medianOfSeries, memorySeries } from "./sample_series.ts";
 * if (medianOfSeries(memorySeries(new Float64Array([4, 1, 3, 2]))) !== 2.5) throw new Error();
 * ```
 */
export function medianOfSeries(
  series: SampleSeries,
  map?: (value: number) => number,
): number {
  const n = series.length;
  if (n === 0) return NaN;
  if (n % 2 === 1) return kthSmallest(series, n >> 1, map);
  const [lower, upper] = kthSmallestOfMany(series, [(n >> 1) - 1, n >> 1], map);
  return (lower + upper) / 2;
}
