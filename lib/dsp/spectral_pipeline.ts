/**
 * The spectral core behind a reader: in the same thread, or, for long
 * records, in a worker thread that transforms while the reader reads and
 * checks the next chunks. Either way the estimate is the same
 * {@linkcode SpectralAccumulator}'s, fed the same samples in the same order,
 * so the numbers are identical to the last bit.
 *
 * The reader calls `push` synchronously (a CSV chunk is handed on from inside
 * the parser), so the hand-over is a ring of a few slots in shared memory:
 * `push` copies a chunk into a free slot and waits (Atomics.wait) only when
 * every slot is still full, which bounds the memory whatever the speed of
 * either side.
 *
 * @module
 */
import {
  SpectralAccumulator,
  type SpectralEstimate,
  type SpectralOptions,
  validateSpectralOptions,
} from "./spectral_core.ts";
import { SharedRing } from "../shared_ring.ts";
import { insideWorker, thrownError } from "../workers.ts";
import {
  END_OF_RECORD,
  type SpectralWorkerReply,
  type SpectralWorkerStart,
} from "./spectral_messages.ts";
import { readChecked, type RecordingStream } from "../io/recording_stream.ts";

/** Where the spectral core runs: fed chunk by chunk, then asked for the estimate. */
export interface SpectralSink {
  /** Feeds the next samples of every channel (equal lengths); may wait for a free slot. */
  push(chunk: readonly Float64Array[]): void;
  /** The averaged estimate, as {@linkcode SpectralAccumulator.finish} gives it. */
  finish(): Promise<SpectralEstimate>;
  /** Drops the work after a failed read: stops the worker, if any, so the process can end. */
  cancel(): void;
}

/** Options of {@linkcode spectralSink}. */
export interface SpectralSinkOptions {
  /**
   * Samples per channel the reader will deliver, when known (the recording's
   * length). Default: unknown, which keeps the core in this thread.
   */
  samples?: number;
  /**
   * Where the core runs: `"auto"` uses a worker for at least
   * {@linkcode WORKER_MIN_SAMPLES} samples over all channels on a machine with
   * two or more cores, outside a worker; `"worker"` and `"here"` force the
   * choice. Default `"auto"`.
   */
  thread?: "auto" | "worker" | "here";
}

/**
 * Samples over all channels from which `"auto"` hands the core to a worker:
 * below it, the transforms are too few to repay the worker's start (at 2^22,
 * the bench's CSV, ten alternating runs showed no gain).
 */
export const WORKER_MIN_SAMPLES = 2 ** 23;

/** Slots in the ring between reader and worker. */
const SLOTS = 4;
/** Rows per slot (a longer chunk goes through in pieces). */
const SLOT_ROWS = 65536;
/** How long push waits for a slot before it calls the worker lost. */
const STALL_MS = 300_000;

/**
 * The spectral core for `channelCount` channels, in this thread or in a
 * worker (see {@linkcode SpectralSinkOptions.thread}). Options are checked
 * here, before any worker starts, with the same errors as
 * {@linkcode SpectralAccumulator}.
 *
 * @throws {RangeError} for impossible options; `frames` is refused in a worker.
 *
 * @example
 * ```ts
 * import { spectralSink } from "./spectral_pipeline.ts";
 * const x = new Float64Array(4096).map((_, i) => Math.sin(i));
 * const sink = spectralSink(1, { rate: 1024, block: 256 }, { thread: "worker" });
 * sink.push([x]);
 * const e = await sink.finish();
 * if (e.averages !== 31) throw new Error();
 * ```
 */
export function spectralSink(
  channelCount: number,
  options: SpectralOptions,
  sinkOptions: SpectralSinkOptions = {},
): SpectralSink {
  const thread = sinkOptions.thread ?? "auto";
  const samples = sinkOptions.samples;
  const useWorker = thread === "worker" ||
    (thread === "auto" && samples !== undefined && samples * channelCount >= WORKER_MIN_SAMPLES &&
      (navigator.hardwareConcurrency ?? 1) >= 2 && options.frames === undefined &&
      !insideWorker());
  if (!useWorker) {
    const accumulator = new SpectralAccumulator(channelCount, options);
    return {
      push: (chunk) => accumulator.push(chunk),
      finish: () => Promise.resolve(accumulator.finish()),
      cancel: () => {},
    };
  }
  if (options.frames !== undefined) {
    throw new RangeError('frames cannot be handed out of a worker; use thread: "here"');
  }
  validateSpectralOptions(channelCount, options);
  return new WorkerSink(channelCount, options);
}

class WorkerSink implements SpectralSink {
  readonly #channelCount: number;
  readonly #ring: SharedRing;
  readonly #reply: Promise<SpectralWorkerReply>;
  readonly #worker: Worker;

  constructor(channelCount: number, options: SpectralOptions) {
    this.#channelCount = channelCount;
    this.#ring = SharedRing.create(SLOTS, channelCount * SLOT_ROWS);
    this.#worker = new Worker(new URL("./spectral_worker.ts", import.meta.url).href, {
      type: "module",
    });
    this.#reply = new Promise((resolve) => {
      this.#worker.onmessage = (event) => resolve(event.data);
      this.#worker.onerror = (event) => {
        event.preventDefault();
        resolve({ error: { name: "Error", message: `spectral worker: ${event.message}` } });
      };
    });
    const start: SpectralWorkerStart = {
      channelCount,
      options,
      ring: this.#ring.buffers,
      slotRows: SLOT_ROWS,
    };
    this.#worker.postMessage(start);
  }

  /** Waits for a free slot. */
  #freeSlot(): Float64Array {
    // A slot takes milliseconds; minutes without one mean the worker never started
    // (its events cannot reach this thread while it waits here).
    const slot = this.#ring.claim(STALL_MS);
    if (slot !== undefined) return slot;
    this.#worker.terminate();
    throw new Error(`the spectral worker took no chunk in ${STALL_MS / 1000} s`);
  }

  push(chunk: readonly Float64Array[]): void {
    if (chunk.length !== this.#channelCount) {
      throw new RangeError(`chunk has ${chunk.length} channels, expected ${this.#channelCount}`);
    }
    const length = chunk[0].length;
    if (chunk.some((c) => c.length !== length)) {
      throw new RangeError("every channel of a chunk must have the same length");
    }
    for (let from = 0; from < length; from += SLOT_ROWS) {
      const rows = Math.min(SLOT_ROWS, length - from);
      const slot = this.#freeSlot();
      for (let c = 0; c < chunk.length; c++) {
        slot.set(
          rows === length ? chunk[c] : chunk[c].subarray(from, from + rows),
          c * SLOT_ROWS,
        );
      }
      this.#ring.publish(rows);
    }
  }

  cancel(): void {
    this.#worker.terminate();
  }

  async finish(): Promise<SpectralEstimate> {
    this.#freeSlot();
    this.#ring.publish(0, END_OF_RECORD);
    const reply = await this.#reply;
    this.#worker.terminate();
    if ("estimate" in reply) return reply.estimate;
    throw thrownError(reply.error);
  }
}

/**
 * Reads the channels at `indices` of `stream` through the spectral core (in
 * a worker when {@linkcode spectralSink} chooses one for the stream's length)
 * and returns the estimate with the signal warnings of the read. A failed
 * read stops the worker before the error goes on.
 *
 * @throws {QuiverError} as the reader and the core do.
 *
 * @example
 * ```ts
 * import { spectralEstimateOf } from "./spectral_pipeline.ts";
 * import { recordingSource } from "../io/recording_stream.ts";
 * const data = new Float64Array(1024).map((_, i) => Math.sin(i));
 * const stream = recordingSource({ rate: 256, startTime: 0, channels: [{ name: "a", unit: "V", data }] });
 * const { estimate } = await spectralEstimateOf(stream, [0], { rate: 256, block: 256 });
 * if (estimate.averages !== 7) throw new Error();
 * ```
 */
export async function spectralEstimateOf(
  stream: RecordingStream,
  indices: readonly number[],
  options: SpectralOptions,
  sinkOptions: SpectralSinkOptions = {},
): Promise<{ estimate: SpectralEstimate; warnings: string[] }> {
  const sink = spectralSink(indices.length, options, { samples: stream.length, ...sinkOptions });
  let warnings: string[];
  try {
    warnings = await readChecked(stream, indices, (chunk) => sink.push(chunk));
  } catch (error) {
    sink.cancel();
    throw error;
  }
  return { estimate: await sink.finish(), warnings };
}
