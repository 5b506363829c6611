/**
 * Pass 2 of a CSV file (csv_engine.ts) on several cores. Pass 1 noted where
 * every n-th data row begins (byte offset and line; n is the reader's chunk
 * length), so the file falls into segments of one chunk each. This thread
 * and the workers take segments in file order from one shared counter and
 * parse each with the same {@linkcode CsvRowParser}; a worker hands its
 * segments over through its own ring (lib/shared_ring.ts). This thread
 * consumes the segments in file order (its own as it parses them, the
 * workers' as they arrive), runs the time column check over their rows and
 * hands each on as one chunk. So the chunks, the numbers and the first fault
 * reported are those of the parse in one thread: a segment whose parse
 * fails carries the rows before the fault and the error, which is thrown
 * only when the segment's turn comes.
 *
 * This thread parses from the start while the workers start, and parses
 * less while the chunks it hands on keep it busy: the share of each side
 * follows from the shared counter, not from a fixed split.
 *
 * @module
 */
import { closeSync, openSync, readSync } from "node:fs";
import { changedWhileRead, CsvRowParser, type CsvScan } from "./csv_engine.ts";
import type { DecimalMark } from "./numbers.ts";
import type { TimeStepCheck } from "./csv_recording.ts";
import { type RingBuffers, SharedRing } from "../shared_ring.ts";
import { insideWorker, type PostedError, postedError, thrownError } from "../workers.ts";

/** Slots per worker ring. */
const SLOTS = 3;
/** Segments this thread may parse ahead of their turn. */
const OWN_BUFFERS = 2;
/** Smallest file `"auto"` parses with workers: below it their start (~50 ms) is not repaid. */
export const PARALLEL_MIN_BYTES = 16 * 2 ** 20;
/** Largest shared memory `"auto"` gives the rings (many channels read: parse here). */
const RING_BUDGET_BYTES = 64 * 2 ** 20;
const READ_BYTES = 1 << 20;

/** Where pass 2 runs: see {@linkcode csvParseWorkers}. */
export type CsvParsing = "auto" | "workers" | "here";

/** One segment of the file: bytes [start, end) from line `line` (0: the file's start). */
export interface CsvSegment {
  readonly index: number;
  readonly start: number;
  readonly end: number;
  readonly line: number;
}

/** What the parsers of a file share: what to read and where each segment lies. */
export interface CsvParseJob {
  /** Path to open. */
  readonly path: string;
  /** File name for messages. */
  readonly file: string;
  /** The file's size in bytes when pass 1 read it. */
  readonly size: number;
  readonly scan: CsvScan;
  /** Columns in the header. */
  readonly width: number;
  /** File columns to read, and the factor each is multiplied by. */
  readonly columns: readonly number[];
  readonly factors: readonly number[];
  /** The time column, −1 when none. */
  readonly timeColumn: number;
  readonly decimal: DecimalMark;
  readonly segments: readonly CsvSegment[];
}

/** The message that starts a parse worker. */
export interface CsvWorkerStart {
  readonly job: CsvParseJob;
  /** Word 0: the next segment to take; word 1 + j: 1 + the worker that took segment j (0: none). */
  readonly claims: SharedArrayBuffer;
  /** This worker's number (≥ 1; 0 is the reading thread). */
  readonly worker: number;
  readonly ring: RingBuffers;
}

/** A parse worker's one message: the error of a failed segment, posted before its slot. */
export interface CsvWorkerReply {
  readonly segment: number;
  readonly error: PostedError;
}

/** Ring flag of a segment: failed after the rows it holds. */
export const SEGMENT_FAILED = 1;

/** Doubles per row in a segment's buffer: the channels, then time, its decimals and the line. */
function rowStride(channels: number, timeColumn: number): number {
  return channels + (timeColumn >= 0 ? 3 : 0);
}

/**
 * Where a segment's buffer of `rows` rows holds channel c (at c·rows), and
 * after the channels the time column's values, their decimals and the lines.
 */
function timeBlocks(
  channels: number,
  rows: number,
): { time: number; decimals: number; lines: number } {
  const time = channels * rows;
  return { time, decimals: time + rows, lines: time + 2 * rows };
}

/**
 * How many workers help this thread parse the file (0: it parses alone).
 * Workers need a scan with checkpoints, no quoted cells and a known decimal
 * mark (pass `undefined` when the file does not show it yet). `"auto"` also
 * needs a file of at least {@linkcode PARALLEL_MIN_BYTES}, two cores or
 * more, this thread not itself a worker (a campaign's jobs are) and rings
 * within 64 MiB, and takes one worker per further core (at most 3);
 * `"workers"` takes at least one whatever the file and machine; `"here"`
 * none.
 *
 * @example
 * ```ts
 * import { csvParseWorkers } from "./csv_parallel.ts";
 * const scan = {
 *   headerText: "time_s,a", headerLine: 1, rows: 200_000, quotes: false, delimiter: "," as const,
 *   checkpoints: { every: 65536, offsets: [1, 2, 3], lines: [65538, 131074, 196610] },
 * };
 * const file = { bytes: 5e6, channels: 1, timeColumn: 0, mark: "." as const };
 * if (csvParseWorkers(scan, file, "here") !== 0) throw new Error();
 * if (csvParseWorkers(scan, file, "auto") !== 0) throw new Error(); // a small file
 * if (csvParseWorkers(scan, file, "workers") < 1) throw new Error();
 * if (csvParseWorkers({ ...scan, quotes: true }, file, "workers") !== 0) throw new Error();
 * ```
 */
export function csvParseWorkers(
  scan: CsvScan,
  file: {
    /** File size. */
    bytes: number;
    /** Channels read. */
    channels: number;
    timeColumn: number;
    mark: DecimalMark | undefined;
  },
  parsing: CsvParsing,
): number {
  const checkpoints = scan.checkpoints;
  if (parsing === "here" || checkpoints === undefined || scan.quotes || file.mark === undefined) {
    return 0;
  }
  const further = Math.min(3, (navigator.hardwareConcurrency ?? 1) - 1);
  if (parsing === "workers") return Math.max(1, further);
  const ringBytes = further * SLOTS * 8 * checkpoints.every *
    rowStride(file.channels, file.timeColumn);
  return file.bytes >= PARALLEL_MIN_BYTES && further >= 1 && !insideWorker() &&
      ringBytes <= RING_BUDGET_BYTES
    ? further
    : 0;
}

/** The segments of a file from its scan's checkpoints. */
function segmentsOf(scan: CsvScan): CsvSegment[] {
  const { offsets, lines } = scan.checkpoints!;
  const starts = [0, ...offsets];
  return starts.map((start, index) => ({
    index,
    start,
    end: index + 1 < starts.length ? starts[index + 1] : Infinity,
    line: index === 0 ? 0 : lines[index - 1],
  }));
}

/**
 * Parses one segment of the file open as `fd` into `into`: per row the read
 * channels (times their factors), then the time, its decimals and the line.
 * Returns the rows written and the error that stopped the parse, if any.
 */
export function parseSegment(
  job: CsvParseJob,
  segment: CsvSegment,
  fd: number,
  bytes: Uint8Array,
  into: Float64Array,
): { rows: number; error?: unknown } {
  const { columns, factors, timeColumn } = job;
  const capacity = job.scan.checkpoints!.every;
  const { time, decimals: decimalsAt, lines: linesAt } = timeBlocks(columns.length, capacity);
  let filled = 0;
  const parser = new CsvRowParser(job.scan, job.width, {
    row(values, line, decimals) {
      if (filled === capacity) {
        throw changedWhileRead(job.file, job.scan.rows);
      }
      for (let j = 0; j < columns.length; j++) {
        into[j * capacity + filled] = values[columns[j]] * factors[j];
      }
      if (timeColumn >= 0) {
        into[time + filled] = values[timeColumn];
        into[decimalsAt + filled] = decimals[timeColumn];
        into[linesAt + filled] = line;
      }
      filled++;
    },
  }, {
    file: job.file,
    decimal: job.decimal,
    decimalsOf: timeColumn >= 0 ? [timeColumn] : [],
    ...(segment.index > 0 ? { startLine: segment.line } : {}),
  });
  try {
    for (let position = segment.start; position < segment.end;) {
      const got = readSync(fd, bytes, 0, Math.min(READ_BYTES, segment.end - position), position);
      if (got === 0) {
        // The last segment ends where the file does, which must be where pass 1 saw it end
        // (checked before a row cut short is judged).
        if (segment.end === Infinity && position === job.size) break;
        throw changedWhileRead(job.file, job.scan.rows); // it ended inside a segment
      }
      parser.push(bytes.subarray(0, got));
      position += got;
    }
    parser.end();
  } catch (error) {
    return { rows: filled, error };
  }
  return { rows: filled };
}

/** The worker loop: take the next segment, parse it into a free slot, publish; until none is left. */
export function parseSegmentsInWorker(
  start: CsvWorkerStart,
  post: (reply: CsvWorkerReply) => void,
  stallMs: number,
): void {
  const { job } = start;
  const claims = new Int32Array(start.claims);
  const ring = SharedRing.attach(start.ring);
  const fd = openSync(job.path, "r");
  const bytes = new Uint8Array(READ_BYTES);
  try {
    for (;;) {
      const slot = ring.claim(stallMs);
      if (slot === undefined) return; // the reading thread has gone
      const index = Atomics.add(claims, 0, 1);
      if (index >= job.segments.length) return;
      Atomics.store(claims, 1 + index, start.worker);
      Atomics.notify(claims, 1 + index);
      const { rows, error } = parseSegment(job, job.segments[index], fd, bytes, slot);
      if (error !== undefined) {
        post({ segment: index, error: postedError(error) });
        ring.publish(rows, SEGMENT_FAILED);
        return;
      }
      ring.publish(rows);
    }
  } finally {
    closeSync(fd);
  }
}

/** What {@linkcode readCsvInWorkers} reads: a job without its segments (the scan gives them), and who parses. */
export interface CsvParallelRead extends Omit<CsvParseJob, "segments"> {
  /** Workers besides this thread ({@linkcode csvParseWorkers}). */
  readonly workers: number;
  /** Checks the time column; required when there is one. */
  readonly check?: TimeStepCheck;
}

/**
 * Reads the columns through `onChunk`, this thread and `workers` workers
 * parsing; the chunks, values and faults are those of the parse in one
 * thread.
 *
 * @throws {QuiverError} for the first fault in file order.
 */
export async function readCsvInWorkers(
  read: CsvParallelRead,
  onChunk: (chunk: Float64Array[]) => void,
): Promise<void> {
  const { workers: workerCount, check, ...what } = read;
  const { scan, timeColumn } = what;
  const rows = scan.checkpoints!.every;
  const segments = segmentsOf(scan);
  const job: CsvParseJob = { ...what, segments };
  const channels = read.columns.length;
  const length = rowStride(channels, timeColumn) * rows;
  const claims = new Int32Array(new SharedArrayBuffer(4 * (1 + segments.length)));
  const rings = Array.from({ length: workerCount }, () => SharedRing.create(SLOTS, length));
  const errors = new Map<number, PostedError>();
  let replied: (() => void) | undefined;
  let lost: (error: Error) => void = () => {};
  const workerLost = new Promise<never>((_, reject) => lost = reject);
  workerLost.catch(() => {}); // raced below
  const workers = rings.map((ring, w) => {
    const worker = new Worker(new URL("./csv_parse_worker.ts", import.meta.url).href, {
      type: "module",
    });
    worker.onmessage = (event: MessageEvent<CsvWorkerReply>) => {
      errors.set(event.data.segment, event.data.error);
      replied?.();
    };
    worker.onerror = (event) => {
      event.preventDefault();
      lost(new Error(`CSV parse worker: ${event.message}`));
    };
    const start: CsvWorkerStart = {
      job,
      claims: claims.buffer as SharedArrayBuffer,
      worker: w + 1,
      ring: ring.buffers,
    };
    worker.postMessage(start);
    return worker;
  });
  const fd = openSync(read.path, "r");
  const bytes = new Uint8Array(READ_BYTES);
  // Segments parsed here ahead of their turn, and the buffers free for more.
  const parsedHere = new Map<number, { data: Float64Array; rows: number; error?: unknown }>();
  const free: Float64Array[] = Array.from({ length: OWN_BUFFERS }, () => new Float64Array(length));
  const parseHere = (k: number) => {
    const data = free.pop()!;
    parsedHere.set(k, { data, ...parseSegment(job, segments[k], fd, bytes, data) });
  };
  const claim = (k: number) => Atomics.compareExchange(claims, 0, k, k + 1) === k;
  try {
    for (const segment of segments) {
      const j = segment.index;
      let data: Float64Array, filled: number, failure: unknown;
      let ring: SharedRing | undefined;
      for (;;) {
        const here = parsedHere.get(j);
        if (here !== undefined) {
          parsedHere.delete(j);
          free.push(here.data);
          data = here.data; // not reused before this segment is handed on
          filled = here.rows;
          failure = here.error;
          break;
        }
        if (claim(j)) {
          parseHere(j); // nobody has taken it, so nothing after it either: every buffer is free
          continue;
        }
        // A worker has it: it takes a slot, then the segment, then says which worker it is.
        const owner = Atomics.load(claims, 1 + j);
        const published = owner === 0 ? undefined : rings[owner - 1].poll();
        if (published === undefined) {
          // Not there yet: parse the next free segment meanwhile, if there is room for it.
          const next = Atomics.load(claims, 0);
          if (free.length > 0 && next < segments.length && claim(next)) {
            parseHere(next);
            continue;
          }
        }
        if (owner === 0) {
          const waiting = Atomics.waitAsync(claims, 1 + j, 0);
          if (waiting.async) await Promise.race([waiting.value, workerLost]);
          continue;
        }
        ring = rings[owner - 1];
        const taken = published ?? await Promise.race([ring.takeAsync(), workerLost]);
        data = taken.data;
        filled = taken.count;
        if (taken.flag === SEGMENT_FAILED) {
          // The error was posted before the slot; its message may still be on its way.
          while (!errors.has(j)) {
            await Promise.race([new Promise<void>((r) => replied = r), workerLost]);
          }
          failure = thrownError(errors.get(j)!);
        }
        break;
      }
      const last = j === segments.length - 1;
      const expected = last ? scan.rows - rows * j : rows;
      if (check !== undefined) {
        const { time, decimals, lines: line } = timeBlocks(channels, rows);
        const checked = Math.min(filled, expected);
        for (let i = 0; i < checked; i++) {
          check.push(data[time + i], data[line + i], data[decimals + i]);
        }
      }
      // In the order the parse in one thread meets them: a row beyond those counted, then the
      // segment's fault, then rows missing at the end.
      if (filled > expected) throw changedWhileRead(read.file, scan.rows);
      if (failure !== undefined) throw failure;
      if (filled < expected) throw changedWhileRead(read.file, scan.rows);
      if (last) check?.end();
      onChunk(read.columns.map((_, c) => data.subarray(c * rows, c * rows + filled)));
      ring?.release();
    }
  } finally {
    closeSync(fd);
    for (const worker of workers) worker.terminate();
  }
}
