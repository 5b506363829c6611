/**
 * A pool of Deno workers that run plan steps in parallel: one worker per
 * job, each running one step at a time. The plan runner decides the order;
 * the pool only executes.
 *
 * @module
 */
import { formatNumber } from "../lib/format_number.ts";

/**
 * Memory set aside per worker in the `--jobs` cap: 512 MiB. An estimate, not
 * a measurement of each step: a worker's isolate with quiver's modules loaded
 * takes about 30 MB (200 idle-ish workers took 6.3 GB), and a step reads its
 * recording in chunks (65 536 rows per chunk), so its spectral core, chunks
 * and result table stay within a few hundred MB at the default block sizes.
 */
export const WORKER_MEMORY_BYTES = 512 * 2 ** 20;

/** The share of the machine's memory the workers may take together: half. */
export const WORKER_MEMORY_SHARE = 0.5;

/** What the machine offers the pool. */
export interface Machine {
  /** Logical CPU cores. */
  readonly cores: number;
  /** Total memory, bytes. */
  readonly memoryBytes: number;
}

/** The number of jobs to run, and why it is fewer than asked when it is. */
export interface JobsChoice {
  /** Steps at once, at least 1. */
  readonly jobs: number;
  /** A line saying what capped the request; absent when nothing did. */
  readonly note?: string;
}

/**
 * Caps the steps run at once at the machine's cores and at the workers its
 * memory holds ({@linkcode WORKER_MEMORY_SHARE} of it, at
 * {@linkcode WORKER_MEMORY_BYTES} each), never below 1.
 *
 * @throws {RangeError} for a request or machine figures that are not positive.
 *
 * @example
 * ```ts
 * import { capJobs } from "./worker_pool.ts";
 * const c = capJobs(1000, { cores: 2, memoryBytes: 16 * 2 ** 30 });
 * if (c.jobs !== 2 || !c.note?.includes("2 CPU cores")) throw new Error(c.note);
 * if (capJobs(2, { cores: 8, memoryBytes: 16 * 2 ** 30 }).note !== undefined) throw new Error();
 * // 2 GiB hold two workers of 512 MiB in their half.
 * if (capJobs(8, { cores: 8, memoryBytes: 2 * 2 ** 30 }).jobs !== 2) throw new Error();
 * ```
 */
export function capJobs(requested: number, machine: Machine): JobsChoice {
  if (!Number.isInteger(requested) || requested < 1) {
    throw new RangeError(`jobs must be a positive integer, got ${requested}`);
  }
  const { cores, memoryBytes } = machine;
  if (!Number.isInteger(cores) || cores < 1 || !(memoryBytes > 0)) {
    throw new RangeError(`a machine needs cores and memory, got ${cores} and ${memoryBytes}`);
  }
  const byMemory = Math.max(1, Math.floor(memoryBytes * WORKER_MEMORY_SHARE / WORKER_MEMORY_BYTES));
  const jobs = Math.min(requested, cores, byMemory);
  if (jobs === requested) return { jobs };
  const gib = formatNumber(memoryBytes / 2 ** 30, 3);
  // What binds: the cores, the memory, or both when they allow the same.
  const reasons = [
    ...(cores === jobs ? [`${cores} CPU core${cores === 1 ? "" : "s"}`] : []),
    ...(byMemory === jobs
      ? [
        `memory for ${byMemory} worker(s) at ${
          WORKER_MEMORY_BYTES / 2 ** 20
        } MiB each in half of ${gib} GiB`,
      ]
      : []),
  ];
  return { jobs, note: `--jobs ${requested} capped at ${jobs}: ${reasons.join(" and ")}` };
}

/** Runs steps on up to `size` workers. */
export class WorkerPool {
  readonly #idle: Worker[] = [];
  readonly #waiting: ((worker: Worker) => void)[] = [];
  readonly #all: Worker[] = [];

  readonly #size: number;

  /** A pool of at most `size` workers; none starts before a step needs one. */
  constructor(size: number) {
    if (!Number.isInteger(size) || size < 1) {
      throw new RangeError(`a pool needs at least one worker, got ${size}`);
    }
    this.#size = size;
  }

  /** Workers started so far (at most the number of steps that ran at once). */
  get started(): number {
    return this.#all.length;
  }

  #take(): Promise<Worker> {
    const idle = this.#idle.pop();
    if (idle !== undefined) return Promise.resolve(idle);
    if (this.#all.length < this.#size) {
      const worker = new Worker(new URL("./plan_worker.ts", import.meta.url).href, {
        type: "module",
      });
      this.#all.push(worker);
      return Promise.resolve(worker);
    }
    return new Promise<Worker>((resolve) => this.#waiting.push(resolve));
  }

  /**
   * Runs a command with `argv` on a free worker, its log lines labelled with
   * `label`; rejects with the command's error message.
   */
  async run(command: string, argv: readonly string[], label = ""): Promise<void> {
    const worker = await this.#take();
    try {
      const reply = await new Promise<{ ok: boolean; error?: string }>((resolve, reject) => {
        worker.onmessage = (event) => resolve(event.data);
        worker.onerror = (event) => {
          event.preventDefault();
          reject(new Error(event.message));
        };
        worker.postMessage({ command, argv: [...argv], label });
      });
      if (!reply.ok) throw new Error(reply.error);
    } finally {
      const next = this.#waiting.shift();
      if (next !== undefined) next(worker);
      else this.#idle.push(worker);
    }
  }

  /** Stops every worker. */
  close(): void {
    for (const w of this.#all) w.terminate();
  }
}
