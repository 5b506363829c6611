/**
 * Byte-level helpers the CSV reader's two passes share: record ends outside
 * quotes, row text, joining the bytes carried between chunks, and the one
 * pass that tells which of a high byte, a NUL and a quote a chunk holds.
 *
 * @module
 */

// Byte values as module constants of this file: V8 folds them into the loops.
const LF = 10, CR = 13, SPACE = 32, TAB = 9, QUOTE = 34;

/**
 * Whether byte `b` is whitespace around a cell (space, tab, CR).
 *
 * @example
 * ```ts
 * import { isSpace } from "./csv_bytes.ts";
 * if (!isSpace(32) || isSpace(44)) throw new Error();
 * ```
 */
export const isSpace = (b: number): boolean => b === SPACE || b === TAB || b === CR;

const decoder = new TextDecoder();

/**
 * The UTF-8 text of bytes[start, end).
 *
 * @example
 * ```ts
 * import { text } from "./csv_bytes.ts";
 * if (text(new TextEncoder().encode("a,b"), 2, 3) !== "b") throw new Error();
 * ```
 */
export const text = (bytes: Uint8Array, start: number, end: number): string =>
  decoder.decode(bytes.subarray(start, end));

/**
 * The LF that ends the record starting at `start`, outside quotes; −1 when not in `bytes`.
 *
 * @example
 * ```ts
 * import { recordEnd } from "./csv_bytes.ts";
 * if (recordEnd(new TextEncoder().encode('"a\nb",1\n2'), 0) !== 7) throw new Error();
 * ```
 */
export function recordEnd(bytes: Uint8Array, start: number): number {
  let inQuote = false;
  for (let k = start; k < bytes.length; k++) {
    const b = bytes[k];
    if (b === QUOTE) inQuote = !inQuote;
    else if (b === LF && !inQuote) return k;
  }
  return -1;
}

/**
 * A row's text without its line end (a CR before `end` is dropped).
 *
 * @example
 * ```ts
 * import { rowText } from "./csv_bytes.ts";
 * if (rowText(new TextEncoder().encode("1,2\r\n"), 0, 4) !== "1,2") throw new Error();
 * ```
 */
export function rowText(bytes: Uint8Array, start: number, end: number): string {
  return decoder.decode(
    bytes.subarray(start, end > start && bytes[end - 1] === CR ? end - 1 : end),
  );
}

/**
 * `kept` then `more` in a new array: for bytes kept past this push, as the
 * reader refills the buffer `more` lies in.
 *
 * @example
 * ```ts
 * import { appended } from "./csv_bytes.ts";
 * if (appended(new Uint8Array([1]), new Uint8Array([2])).join() !== "1,2") throw new Error();
 * ```
 */
export function appended(kept: Uint8Array, more: Uint8Array): Uint8Array {
  const out = new Uint8Array(kept.length + more.length);
  out.set(kept);
  out.set(more, kept.length);
  return out;
}

/**
 * `a` then `b`, copying only when `a` holds anything (for bytes used within this push).
 *
 * @example
 * ```ts
 * import { concat } from "./csv_bytes.ts";
 * const b = new Uint8Array([2]);
 * if (concat(new Uint8Array(0), b) !== b) throw new Error();
 * ```
 */
export function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  if (a.length === 0) return b;
  const out = new Uint8Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  return out;
}

/** {@linkcode byteKinds}: a byte ≥ 0x80 occurs. */
export const HIGH_BYTE = 1;
/** {@linkcode byteKinds}: a NUL byte occurs. */
export const NUL_BYTE = 2;
/** {@linkcode byteKinds}: a quote occurs. */
export const QUOTE_BYTE = 4;

/**
 * Which of a byte ≥ 0x80, a NUL and a quote occur in `bytes`, as flags, in
 * one pass: four bytes at a time where the chunk is aligned (a file chunk
 * always is), with the classic "has a zero byte" word test.
 *
 * @example
 * ```ts
 * import { byteKinds, NUL_BYTE, QUOTE_BYTE } from "./csv_bytes.ts";
 * if (byteKinds(new TextEncoder().encode('a,"b"\0')) !== (NUL_BYTE | QUOTE_BYTE)) throw new Error();
 * ```
 */
export function byteKinds(bytes: Uint8Array): number {
  let high = 0, nul = 0, quote = 0;
  let k = 0;
  if (bytes.byteOffset % 4 === 0) {
    const words = new Uint32Array(bytes.buffer, bytes.byteOffset, bytes.length >> 2);
    for (let w = 0; w < words.length; w++) {
      const word = words[w];
      const quoted = word ^ 0x22222222;
      high |= word;
      nul |= (word - 0x01010101) & ~word;
      quote |= (quoted - 0x01010101) & ~quoted;
    }
    k = words.length << 2;
  }
  // (w − 0x01010101) & ~w & 0x80808080 is non-zero exactly when a byte of w is
  // zero (a borrow can only mark bytes above a zero byte), so the OR over all
  // words, masked once, answers for the chunk.
  let kinds = ((high & 0x80808080) !== 0 ? HIGH_BYTE : 0) |
    ((nul & 0x80808080) !== 0 ? NUL_BYTE : 0) |
    ((quote & 0x80808080) !== 0 ? QUOTE_BYTE : 0);
  for (; k < bytes.length; k++) {
    const b = bytes[k];
    if (b >= 0x80) kinds |= HIGH_BYTE;
    else if (b === 0) kinds |= NUL_BYTE;
    else if (b === QUOTE) kinds |= QUOTE_BYTE;
  }
  return kinds;
}
