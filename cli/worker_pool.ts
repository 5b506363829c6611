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

  constructor(size: number) {
    for (let i = 0; i < size; i++) {
      const worker = new Worker(new URL("./plan_worker.ts", import.meta.url).href, {
        type: "module",
      });
      this.#all.push(worker);
      this.#idle.push(worker);
    }
  }

  /** Runs a command with `argv` on a free worker; rejects with the command's error message. */
  async run(command: string, argv: readonly string[]): Promise<void> {
    const worker = this.#idle.pop() ??
      await new Promise<Worker>((resolve) => this.#waiting.push(resolve));
    try {
      const reply = await new Promise<{ ok: boolean; error?: string }>((resolve, reject) => {
        worker.onmessage = (event) => resolve(event.data);
        worker.onerror = (event) => {
          event.preventDefault();
          reject(new Error(event.message));
        };
        worker.postMessage({ command, argv: [...argv] });
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
