/**
 * What every worker boundary of quiver needs: whether this thread is itself
 * a worker (a campaign's jobs are: they do not start workers of their own),
 * and errors across the boundary: structured cloning keeps neither the class
 * nor a {@linkcode QuiverError}'s location and kind, so a worker posts a
 * plain form and the thread that started it throws the same error again.
 *
 * @module
 */
import { type ErrorKind, type ErrorLocation, QuiverError } from "./errors.ts";

/**
 * Whether this code runs in a worker thread.
 *
 * @example
 * ```ts
 * import { insideWorker } from "./workers.ts";
 * if (insideWorker()) throw new Error(); // a doc test runs in the main thread
 * ```
 */
export function insideWorker(): boolean {
  return typeof (globalThis as { WorkerGlobalScope?: unknown }).WorkerGlobalScope !== "undefined";
}

/** An error as a worker posts it. */
export interface PostedError {
  name: string;
  message: string;
  /** A QuiverError's message without location, its location and kind. */
  detail?: string;
  location?: ErrorLocation;
  kind?: ErrorKind;
}

/**
 * The plain form of `error`, to post.
 *
 * @example
 * ```ts
 * import { postedError, thrownError } from "./workers.ts";
 * import { QuiverError } from "./errors.ts";
 * const again = thrownError(postedError(new QuiverError("bad cell", { file: "a.csv", line: 3 })));
 * if (!(again instanceof QuiverError) || again.message !== "a.csv:3: bad cell") throw new Error();
 * ```
 */
export function postedError(error: unknown): PostedError {
  if (error instanceof QuiverError) {
    return {
      name: error.name,
      message: error.message,
      detail: error.detail,
      location: error.location,
      kind: error.kind,
    };
  }
  if (error instanceof Error) return { name: error.name, message: error.message };
  return { name: "Error", message: String(error) };
}

/**
 * The error a {@linkcode PostedError} was made from: a QuiverError with its
 * location and kind, a RangeError or TypeError, else an Error with the message.
 *
 * @example
 * ```ts
 * import { thrownError } from "./workers.ts";
 * if (!(thrownError({ name: "RangeError", message: "block" }) instanceof RangeError)) throw new Error();
 * ```
 */
export function thrownError(posted: PostedError): Error {
  const { name, message, detail, location, kind } = posted;
  if (name === "QuiverError") return new QuiverError(detail ?? message, location ?? {}, kind);
  if (name === "RangeError") return new RangeError(message);
  if (name === "TypeError") return new TypeError(message);
  return new Error(message);
}
