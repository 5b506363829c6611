/**
 * The spectral core behind a reader, its transforms on every core for long
 * records: the channels fall into groups (a channel stays with those it
 * forms cross spectra with), this thread keeps one group and a worker takes
 * each other, each group with its own {@linkcode SpectralAccumulator} fed
 * the same samples in the same order. A channel's spectra depend on that
 * channel's samples alone (a cross spectrum on its pair's), so the numbers
 * are identical to the last bit wherever they were made.
 *
 * A stream opened from a WAV file (a recipe to open it again:
 * {@linkcode streamRecipe}) is read by every thread for its own channels
 * only, so that decoding is shared too. Otherwise the reader calls `push`
 * synchronously (a CSV chunk is handed on from inside the parser), so a
 * worker's share goes through a ring of slots in shared memory (16 MiB):
 * `push` copies the worker's channels into a free slot and waits
 * (Atomics.wait) only when every slot is still full, which bounds the
 * memory whatever the speed of either side, then transforms this thread's
 * channels while the worker transforms its own. Read through
 * {@linkcode spectralEstimateOf}, each thread also makes the signal checks
 * of its own channels (lib/io/signal_checks.ts: the same warnings, in the
 * same order, as {@linkcode readChecked} gives in one thread).
 *
 * @module
 */
import {
  SpectralAccumulator,
  type SpectralEstimate,
  type SpectralOptions,
  validateSpectralOptions,
} from "./spectral_core.ts";
import { QuiverError } from "../errors.ts";
import { SharedRing } from "../shared_ring.ts";
import { insideWorker, thrownError } from "../workers.ts";
import {
  type CheckedChannel,
  END_OF_RECORD,
  type SpectralWorkerReply,
  type SpectralWorkerStart,
} from "./spectral_messages.ts";
import {
  readChecked,
  type RecordingStream,
  type StreamRecipe,
  streamRecipe,
} from "../io/recording_stream.ts";
import { ChannelStatistics } from "../io/signal_checks.ts";

/** Where the spectral core runs: fed chunk by chunk, then asked for the estimate. */
export interface SpectralSink {
  /** Feeds the next samples of every channel (equal lengths); may wait for a free slot. */
  push(chunk: readonly Float64Array[]): void;
  /** The averaged estimate, as {@linkcode SpectralAccumulator.finish} gives it. */
  finish(): Promise<SpectralEstimate>;
  /** Drops the work after a failed read: stops the workers, if any, so the process can end. */
  cancel(): void;
}

/** Options of {@linkcode spectralSink}. */
export interface SpectralSinkOptions {
  /**
   * Samples per channel the reader will deliver, when known (the recording's
   * length). Default: unknown, which keeps every transform in this thread.
   */
  samples?: number;
  /**
   * Threads that share the channels' transforms, for tests that compare the
   * paths bit for bit (the choice is otherwise automatic: one per core, at
   * most one per channel group, for at least {@linkcode SPLIT_MIN_SAMPLES}
   * samples over all channels, outside a worker, without `frames`). Values
   * above the channel groups are cut to them. Default: automatic.
   */
  threads?: number;
}

/**
 * Samples over all channels from which the transforms are shared out:
 * below it they are too few to repay a worker's start.
 */
export const SPLIT_MIN_SAMPLES = 2 ** 23;

/** Rows per slot (a longer chunk goes through in pieces). */
const SLOT_ROWS = 65536;
/**
 * Shared memory of one worker's ring: 16 slots of two channels. The reader
 * fills slots while the worker starts (tens of milliseconds, far more on a
 * busy machine) and goes on with its own channels meanwhile; with too few
 * slots it would wait for the start instead.
 */
const RING_BYTES = 16 * 2 ** 20;
/** Slots in a ring of `channels` channels: as many as {@linkcode RING_BYTES} hold, at least 2. */
const slotsFor = (channels: number) =>
  Math.max(2, Math.floor(RING_BYTES / (channels * SLOT_ROWS * 8)));
/** How long push waits for a slot before it calls the worker lost. */
const STALL_MS = 300_000;

/**
 * The channels `0 … channelCount−1` in at most `parts` groups whose
 * transforms can be made apart: the two channels of a pair are in one group.
 * The groups are as even as the pairs allow, the smallest first (this
 * thread's, as it also reads); each lists its channels in ascending order.
 *
 * @example
 * ```ts
 * import { channelGroups } from "./spectral_pipeline.ts";
 * if (JSON.stringify(channelGroups(4, [], 2)) !== "[[0,2],[1,3]]") throw new Error();
 * if (JSON.stringify(channelGroups(3, [[0, 2]], 2)) !== "[[1],[0,2]]") throw new Error();
 * if (channelGroups(2, [[0, 1]], 2).length !== 1) throw new Error();
 * ```
 */
export function channelGroups(
  channelCount: number,
  pairs: readonly (readonly [number, number])[],
  parts: number,
): number[][] {
  // Channels joined by pairs, as components of a union–find.
  const root = Array.from({ length: channelCount }, (_, c) => c);
  const find = (c: number): number => root[c] === c ? c : (root[c] = find(root[c]));
  for (const [x, y] of pairs) root[find(x)] = find(y);
  const components = new Map<number, number[]>();
  for (let c = 0; c < channelCount; c++) {
    const r = find(c);
    components.set(r, [...(components.get(r) ?? []), c]);
  }
  // Largest component first into the group with fewest channels: an even split.
  const sorted = [...components.values()].sort((a, b) => b.length - a.length || a[0] - b[0]);
  const groups: number[][] = Array.from(
    { length: Math.max(1, Math.min(parts, sorted.length)) },
    () => [],
  );
  for (const component of sorted) {
    let smallest = groups[0];
    for (const g of groups) if (g.length < smallest.length) smallest = g;
    smallest.push(...component);
  }
  for (const g of groups) g.sort((a, b) => a - b);
  return groups.sort((a, b) => a.length - b.length || a[0] - b[0]);
}

/** How many threads share the transforms when the caller leaves it to the pipeline. */
function automaticThreads(
  channelCount: number,
  options: SpectralOptions,
  samples: number | undefined,
): number {
  return samples !== undefined && samples * channelCount >= SPLIT_MIN_SAMPLES &&
      options.frames === undefined && !insideWorker()
    ? navigator.hardwareConcurrency ?? 1
    : 1;
}

/**
 * The spectral core for `channelCount` channels, its transforms shared
 * among threads as {@linkcode SpectralSinkOptions.threads} says. Options are
 * checked here, before any worker starts, with the same errors as
 * {@linkcode SpectralAccumulator}.
 *
 * @throws {RangeError} for impossible options; `frames` with more than one thread.
 *
 * @example
 * ```ts
 * import { spectralSink } from "./spectral_pipeline.ts";
 * const x = new Float64Array(4096).map((_, i) => Math.sin(i));
 * const sink = spectralSink(2, { rate: 1024, block: 256 }, { threads: 2 });
 * sink.push([x, x]);
 * const e = await sink.finish();
 * if (e.averages !== 31 || e.auto[0].join() !== e.auto[1].join()) throw new Error();
 * ```
 */
export function spectralSink(
  channelCount: number,
  options: SpectralOptions,
  sinkOptions: SpectralSinkOptions = {},
): SpectralSink {
  return chosenSink(channelCount, options, sinkOptions);
}

/**
 * {@linkcode spectralSink}'s choice; with `checks` (one per channel), a
 * shared sink also makes the channels' signal checks, each in the thread
 * that transforms the channel.
 */
function chosenSink(
  channelCount: number,
  options: SpectralOptions,
  sinkOptions: SpectralSinkOptions,
  checks?: readonly CheckedChannel[],
  reading?: OwnReading,
): SpectralSink | SharedSink {
  validateSpectralOptions(channelCount, options);
  const threads = sinkOptions.threads ??
    automaticThreads(channelCount, options, sinkOptions.samples);
  const groups = channelGroups(channelCount, options.pairs ?? [], threads);
  if (groups.length === 1) {
    const accumulator = new SpectralAccumulator(channelCount, options);
    return {
      push: (chunk) => accumulator.push(chunk),
      finish: () => Promise.resolve(accumulator.finish()),
      cancel: () => {},
    };
  }
  if (options.frames !== undefined) {
    throw new RangeError("frames cannot be handed out of a worker; use one thread");
  }
  return new SharedSink(channelCount, options, groups, checks, reading);
}

/** The options of one group's accumulator: its pairs, numbered within the group. */
function groupOptions(options: SpectralOptions, group: readonly number[]): SpectralOptions {
  const pairs = (options.pairs ?? []).filter(([x]) => group.includes(x));
  return {
    ...options,
    pairs: pairs.map(([x, y]) => [group.indexOf(x), group.indexOf(y)] as const),
  };
}

/** A group's channels of a chunk. */
const pick = (chunk: readonly Float64Array[], group: readonly number[]) =>
  group.map((c) => chunk[c]);

/** How the workers read for themselves: the stream's recipe and the stream's channel of each. */
interface OwnReading {
  readonly recipe: StreamRecipe;
  readonly indices: readonly number[];
}

/**
 * One group's accumulator in a worker, fed through a ring, or reading its
 * channels itself when given `reading`.
 */
class WorkerPart {
  readonly group: readonly number[];
  readonly #ring: SharedRing | undefined;
  readonly #reply: Promise<SpectralWorkerReply>;
  readonly #worker: Worker;

  constructor(
    group: readonly number[],
    options: SpectralOptions,
    checks: readonly CheckedChannel[] | undefined,
    reading?: OwnReading,
  ) {
    this.group = group;
    this.#ring = reading === undefined
      ? SharedRing.create(slotsFor(group.length), group.length * SLOT_ROWS)
      : undefined;
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
    const common = {
      channelCount: group.length,
      options: groupOptions(options, group),
      ...(checks === undefined ? {} : { checks: group.map((c) => checks[c]) }),
    };
    const start: SpectralWorkerStart = this.#ring !== undefined
      ? { ...common, ring: this.#ring.buffers, slotRows: SLOT_ROWS }
      : {
        ...common,
        reopen: { recipe: reading!.recipe, channels: group.map((c) => reading!.indices[c]) },
      };
    this.#worker.postMessage(start);
  }

  /** Waits for a free slot. */
  #freeSlot(ring: SharedRing): Float64Array {
    // A slot takes milliseconds; minutes without one mean the worker never started
    // (its events cannot reach this thread while it waits here).
    const slot = ring.claim(STALL_MS);
    if (slot !== undefined) return slot;
    this.#worker.terminate();
    throw new Error(`the spectral worker took no chunk in ${STALL_MS / 1000} s`);
  }

  /** Copies the group's channels of `chunk` into the ring, a slot at a time. */
  push(chunk: readonly Float64Array[]): void {
    const ring = this.#ring;
    if (ring === undefined) throw new Error("this worker reads its own channels: push none");
    const length = chunk[0].length;
    for (let from = 0; from < length; from += SLOT_ROWS) {
      const rows = Math.min(SLOT_ROWS, length - from);
      const slot = this.#freeSlot(ring);
      this.group.forEach((c, i) => {
        slot.set(rows === length ? chunk[c] : chunk[c].subarray(from, from + rows), i * SLOT_ROWS);
      });
      ring.publish(rows);
    }
  }

  cancel(): void {
    this.#worker.terminate();
  }

  /** The group's estimate and, when checks were asked for, each channel's warnings. */
  async finish(): Promise<{ estimate: SpectralEstimate; warnings?: string[][] }> {
    if (this.#ring !== undefined) {
      this.#freeSlot(this.#ring);
      this.#ring.publish(0, END_OF_RECORD);
    }
    const reply = await this.#reply;
    this.#worker.terminate();
    if ("estimate" in reply) return reply;
    throw thrownError(reply.error);
  }
}

/** The first group here, every other in a worker; the estimates joined in channel order. */
class SharedSink implements SpectralSink {
  readonly #channelCount: number;
  readonly #pairs: readonly (readonly [number, number])[];
  readonly #group: readonly number[];
  readonly #here: SpectralAccumulator;
  readonly #workers: WorkerPart[];
  /** With checks: the signal checks of this thread's group, and every channel's warnings. */
  readonly #checks: readonly CheckedChannel[] | undefined;
  readonly #statistics: ChannelStatistics[];
  readonly #warnings: string[][];

  /**
   * Whether the workers read their channels themselves: this thread is then
   * fed its own group's channels only ({@linkcode SharedSink.pushOwn}).
   */
  readonly readsOwn: boolean;

  constructor(
    channelCount: number,
    options: SpectralOptions,
    groups: readonly number[][],
    checks?: readonly CheckedChannel[],
    reading?: OwnReading,
  ) {
    this.#channelCount = channelCount;
    this.#pairs = options.pairs ?? [];
    const [here, ...others] = groups;
    this.#group = here;
    this.readsOwn = reading !== undefined;
    this.#here = new SpectralAccumulator(here.length, groupOptions(options, here));
    // Every channel's rails are checked here, before any worker starts (a RangeError as
    // readChecked gives); this thread keeps its own group's statistics.
    const statistics = (checks ?? []).map((c) => new ChannelStatistics(c.fullScale));
    this.#checks = checks;
    this.#statistics = checks === undefined ? [] : here.map((c) => statistics[c]);
    this.#warnings = [];
    this.#workers = others.map((group) => new WorkerPart(group, options, checks, reading));
  }

  /** This thread's channels, as positions among the sink's channels. */
  get ownGroup(): readonly number[] {
    return this.#group;
  }

  /**
   * The signal warnings of every channel in channel order, after
   * {@linkcode SharedSink.finish} (a sink made with checks).
   */
  warnings(): string[] {
    return this.#warnings.flat();
  }

  push(chunk: readonly Float64Array[]): void {
    if (this.readsOwn) throw new Error("the workers read their own channels: use pushOwn");
    if (chunk.length !== this.#channelCount) {
      throw new RangeError(`chunk has ${chunk.length} channels, expected ${this.#channelCount}`);
    }
    const length = chunk[0].length;
    if (chunk.some((c) => c.length !== length)) {
      throw new RangeError("every channel of a chunk must have the same length");
    }
    // The workers' shares first, so that they transform while this thread does its own.
    for (const worker of this.#workers) worker.push(chunk);
    this.pushOwn(pick(chunk, this.#group));
  }

  /** Feeds this thread's group alone (its channels in the group's order). */
  pushOwn(own: readonly Float64Array[]): void {
    for (let i = 0; i < this.#statistics.length; i++) this.#statistics[i].push(own[i]);
    this.#here.push(own);
  }

  cancel(): void {
    for (const worker of this.#workers) worker.cancel();
  }

  async finish(): Promise<SpectralEstimate> {
    const replies = this.#workers.map((w) => w.finish());
    for (const reply of replies) reply.catch(() => {}); // awaited below, after this thread's
    let here: SpectralEstimate;
    try {
      here = this.#here.finish();
    } catch (error) {
      this.cancel();
      throw error;
    }
    const checks = this.#checks;
    const parts = [{
      group: this.#group,
      estimate: here,
      warnings: checks && this.#group.map((c, i) => this.#statistics[i].warnings(checks[c])),
    }];
    for (let w = 0; w < replies.length; w++) {
      const { estimate, warnings } = await replies[w];
      parts.push({ group: this.#workers[w].group, estimate, warnings });
    }
    for (const { group, warnings } of parts) {
      group.forEach((c, i) => this.#warnings[c] = warnings?.[i] ?? []);
    }
    // Each channel's spectrum, and each pair's, from the group that made it.
    const auto = new Array<Float64Array>(this.#channelCount);
    const made = new Map<string, SpectralEstimate["cross"][number]>();
    for (const { group, estimate } of parts) {
      group.forEach((c, i) => auto[c] = estimate.auto[i]);
      for (const s of estimate.cross) {
        made.set(`${group[s.x]},${group[s.y]}`, { ...s, x: group[s.x], y: group[s.y] });
      }
    }
    const cross = this.#pairs.map(([x, y]) => made.get(`${x},${y}`)!);
    return { ...here, auto, cross };
  }
}

/**
 * After a thread's read failed with `error`: throws the first fault over all
 * the channels at `indices` in file order, by reading them in this thread
 * until it (for a fault in the samples, no further than where that thread
 * found its own); returns when that read finds none, for the caller to
 * throw `error`.
 */
async function firstFault(
  stream: RecordingStream,
  indices: readonly number[],
  error: unknown,
): Promise<void> {
  // Only a fault of the data is looked for again: anything else (a worker that
  // could not start, say) is the error itself.
  if (!(error instanceof QuiverError)) return;
  await stream.read(indices, () => {});
}

/**
 * Reads the channels at `indices` of `stream` through the spectral core
 * (its transforms shared among threads as {@linkcode spectralSink} chooses
 * for the stream's length) and returns the estimate with the signal
 * warnings of the read. A failed read stops the workers before the error
 * goes on. When the workers read their own channels (a WAV file), each
 * thread stops at the first fault of its own channels; the one reported is
 * the first over all of them, as one thread would meet it, found by reading
 * them all again in this thread up to it.
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
  const checks = indices.map((i): CheckedChannel => {
    const { name, unit, fullScale } = stream.channels[i];
    return fullScale === undefined ? { name, unit } : { name, unit, fullScale };
  });
  const recipe = streamRecipe(stream);
  const sink = chosenSink(
    indices.length,
    options,
    { samples: stream.length, ...sinkOptions },
    checks,
    recipe === undefined ? undefined : { recipe, indices },
  );
  let warnings: string[] = [];
  let estimate: SpectralEstimate;
  try {
    // A shared sink checks each channel in the thread that transforms it; otherwise here.
    if (sink instanceof SharedSink && sink.readsOwn) {
      const own = sink.ownGroup.map((c) => indices[c]);
      await stream.read(own, (chunk) => sink.pushOwn(chunk));
    } else if (sink instanceof SharedSink) {
      await stream.read(indices, (chunk) => sink.push(chunk));
    } else warnings = await readChecked(stream, indices, (chunk) => sink.push(chunk));
    estimate = await sink.finish(); // a worker's fault is thrown here
  } catch (error) {
    sink.cancel();
    // With each thread reading its own channels, the first fault in file order over all of them.
    if (sink instanceof SharedSink && sink.readsOwn) await firstFault(stream, indices, error);
    throw error;
  }
  return { estimate, warnings: sink instanceof SharedSink ? sink.warnings() : warnings };
}
