/**
 * A MAT v5 compressed element (miCOMPRESSED: a zlib stream) inflated as a
 * stream through node:zlib: the compressed bytes are read from the file in
 * small pieces only when more inflated bytes are wanted, so what is held is
 * one piece of input and what it inflates to, never the whole variable.
 *
 * @module
 */
import type { FileHandle } from "node:fs/promises";
import { createInflate, type Inflate } from "node:zlib";

/** Compressed bytes fed at a time: deflate expands at most ~1000×, so ≤ ~8 MB held. */
const PIECE = 8192;

/**
 * Thrown when the stream does not inflate (bad data, cut short); the caller names the element.
 *
 * @example
 * ```ts
 * import { InflateFault } from "./mat5_inflate.ts";
 * if (!(new InflateFault("incorrect header check") instanceof Error)) throw new Error();
 * ```
 */
export class InflateFault extends Error {}

/**
 * The inflated bytes of the zlib stream at `start` … `start + length` of an
 * open file, taken in order.
 *
 * @example
 * ```ts
 * import { InflatedElement } from "./mat5_inflate.ts";
 * import { deflateSync } from "node:zlib";
 * import { mkdtemp, open, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/z`, deflateSync(new Uint8Array(100000).fill(7)));
 * const h = await open(`${dir}/z`, "r");
 * const z = new InflatedElement(h, 0, (await h.stat()).size);
 * const out = new Uint8Array(10);
 * await z.skip(99990);
 * const got = await z.take(out, 10);
 * z.close(); await h.close();
 * if (got !== 10 || out[9] !== 7) throw new Error();
 * ```
 */
export class InflatedElement {
  readonly #handle: FileHandle;
  #position: number;
  readonly #end: number;
  readonly #inflate: Inflate;
  #queue: Uint8Array[] = [];
  #queued = 0;
  #ended = false;
  #inputEnded = false;
  #fault: Error | undefined;
  #wake: (() => void) | undefined;
  readonly #piece: Uint8Array;

  /**
   * @param piece compressed bytes fed at a time (default 8192); a header
   * reader feeds fewer, so that it gets its bytes ahead of a fault further on
   */
  constructor(handle: FileHandle, start: number, length: number, piece = PIECE) {
    this.#piece = new Uint8Array(piece);
    this.#handle = handle;
    this.#position = start;
    this.#end = start + length;
    this.#inflate = createInflate();
    this.#inflate.on("data", (b: Uint8Array) => {
      this.#queue.push(b);
      this.#queued += b.length;
    });
    this.#inflate.on("end", () => {
      this.#ended = true;
      this.#wake?.();
    });
    this.#inflate.on("error", (e: Error) => {
      this.#fault = e;
      this.#wake?.();
    });
  }

  /** Feeds one more piece of compressed bytes (or ends the input) and waits for its output. */
  async #feed(): Promise<void> {
    if (this.#inputEnded) {
      this.#ended = true; // ended once already: nothing more will come
      return;
    }
    if (this.#position >= this.#end) {
      // No more input: wait for the stream's end (or its complaint of a cut stream).
      this.#inputEnded = true;
      await new Promise<void>((resolve) => {
        this.#wake = resolve;
        this.#inflate.end();
      });
      return;
    }
    const n = Math.min(this.#piece.length, this.#end - this.#position);
    const { bytesRead } = await this.#handle.read(this.#piece, 0, n, this.#position);
    if (bytesRead < n) throw new InflateFault("the file ends inside the compressed bytes");
    this.#position += n;
    // A copy is written: the piece's buffer is reused for the next read.
    await new Promise<void>((resolve) => {
      this.#wake = resolve;
      this.#inflate.write(this.#piece.slice(0, n), () => resolve());
    });
  }

  /**
   * Copies the next `count` inflated bytes into `target` (from 0); returns
   * how many there were (fewer only at the end of the stream).
   *
   * @throws {InflateFault} when the stream does not inflate.
   */
  async take(target: Uint8Array, count: number): Promise<number> {
    while (this.#queued < count && !this.#ended && this.#fault === undefined) await this.#feed();
    // What inflated before a fault is still served: a header read ahead of bad data names its
    // variable, and the fault is raised where the bytes past it are wanted.
    if (this.#queued < count && this.#fault !== undefined) {
      throw new InflateFault(this.#fault.message);
    }
    let filled = 0;
    while (filled < count && this.#queue.length > 0) {
      const head = this.#queue[0];
      const n = Math.min(head.length, count - filled);
      target.set(head.subarray(0, n), filled);
      filled += n;
      if (n === head.length) this.#queue.shift();
      else this.#queue[0] = head.subarray(n);
    }
    this.#queued -= filled;
    return filled;
  }

  /**
   * Passes over the next `count` inflated bytes; returns how many there were.
   *
   * @throws {InflateFault} when the stream does not inflate.
   */
  async skip(count: number): Promise<number> {
    const scratch = new Uint8Array(Math.min(count, 1 << 16));
    let done = 0;
    while (done < count) {
      const got = await this.take(scratch, Math.min(scratch.length, count - done));
      done += got;
      if (got === 0) break;
    }
    return done;
  }

  /** Stops inflating (what is left is not read). */
  close(): void {
    this.#inflate.removeAllListeners("error");
    this.#inflate.on("error", () => {});
    this.#inflate.destroy();
    this.#queue = [];
  }
}
