/**
 * Text from arrays of bytes or UTF-16 code units, decoded whole by a
 * TextDecoder: a data array spread as the arguments of `String.fromCharCode`
 * overflows the stack for long data (about 200 000 elements in V8).
 *
 * @module
 */

// UTF-16 in this machine's byte order (that of a Uint16Array); a leading U+FEFF stays text.
const UTF16_NATIVE = new TextDecoder(
  new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? "utf-16le" : "utf-16be",
  { ignoreBOM: true },
);

/**
 * The Latin-1 text of bytes: each byte its own code point, U+0000–U+00FF.
 * (TextDecoder's "latin1" label means windows-1252, which remaps 0x80–0x9F,
 * so the bytes are widened to UTF-16 code units instead.)
 *
 * @example
 * ```ts
 * import { latin1 } from "./byte_text.ts";
 * if (latin1(new Uint8Array([0x52, 0x49, 0x46, 0x46, 0x80, 0xb5])) !== "RIFF\u0080\u00b5") throw new Error();
 * ```
 */
export function latin1(bytes: Uint8Array): string {
  return UTF16_NATIVE.decode(new Uint16Array(bytes));
}

/**
 * The text of UTF-16 code units (a lone surrogate becomes U+FFFD; a leading
 * U+FEFF is kept as text).
 *
 * @example
 * ```ts
 * import { utf16Text } from "./byte_text.ts";
 * if (utf16Text(new Uint16Array([0xfeff, 0x6d, 0xd83d, 0xde00])) !== "\ufeffm\u{1f600}") throw new Error();
 * ```
 */
export function utf16Text(units: Uint16Array): string {
  return UTF16_NATIVE.decode(units);
}
