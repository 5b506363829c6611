/**
 * A pool of Deno workers that run plan steps in parallel: one worker per
 * job, each running one step at a time. The plan runner decides the order;
 * the pool only executes.
 *
 * @module
 */

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
