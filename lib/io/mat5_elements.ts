/**
 * The pieces of MATLAB's Level 5 MAT-file layout (MAT v5, as MATLAB's
 * documentation of the MAT-file format describes it): the 128-byte header
 * (descriptive text, version 0x0100, endian indicator "IM" written by a
 * little-endian machine, "MI" by a big-endian one), data element tags (type
 * and byte count, or the small-element form that packs both and up to 4
 * bytes of data into 8 bytes), and the header of an miMATRIX element (array
 * flags with the class, dimensions, name, then the real part's tag). Every
 * element but a compressed one is padded to 8 bytes.
 *
 * @module
 */
import { latin1, utf16Text } from "./byte_text.ts";

/** Data types of MAT v5 elements (miINT8 … miUTF32). */
export const MI = {
  INT8: 1,
  UINT8: 2,
  INT16: 3,
  UINT16: 4,
  INT32: 5,
  UINT32: 6,
  SINGLE: 7,
  DOUBLE: 9,
  INT64: 12,
  UINT64: 13,
  MATRIX: 14,
  COMPRESSED: 15,
  UTF8: 16,
  UTF16: 17,
  UTF32: 18,
} as const;

/** Bytes per value of the numeric data types. */
export const MI_SIZE: Readonly<Record<number, number>> = {
  1: 1,
  2: 1,
  3: 2,
  4: 2,
  5: 4,
  6: 4,
  7: 4,
  9: 8,
  12: 8,
  13: 8,
};

/** MATLAB array classes (mxCLASS), by number, as `quiver info` names them. */
export const MX_CLASS: Readonly<Record<number, string>> = {
  1: "cell",
  2: "struct",
  3: "object",
  4: "char",
  5: "sparse",
  6: "double",
  7: "single",
  8: "int8",
  9: "uint8",
  10: "int16",
  11: "uint16",
  12: "int32",
  13: "uint32",
  14: "int64",
  15: "uint64",
  16: "function handle",
  17: "opaque object",
};

/** The numeric classes: mxDOUBLE_CLASS (6) to mxUINT64_CLASS (15). */
export const isNumericClass = (c: number): boolean => c >= 6 && c <= 15;
/** mxCHAR_CLASS. */
export const CHAR_CLASS = 4;

/** Size of the file header. */
export const MAT5_HEADER_BYTES = 128;

/**
 * The byte order of a MAT v5 file from its header: little-endian for "IM"
 * at bytes 126–127 with version 0x0100, big-endian for "MI"; undefined for
 * any other file (a MAT v7.3 file's header says version 0x0200).
 *
 * @example
 * ```ts
 * import { mat5Endian } from "./mat5_elements.ts";
 * const head = new Uint8Array(128);
 * head.set([0x00, 0x01, 0x49, 0x4d], 124); // 0x0100 little-endian, "IM"
 * if (mat5Endian(head) !== "little") throw new Error();
 * head.set([0x02], 125); // version 0x0200: v7.3, not v5
 * if (mat5Endian(head) !== undefined) throw new Error();
 * ```
 */
export function mat5Endian(head: Uint8Array): "little" | "big" | undefined {
  if (head.length < MAT5_HEADER_BYTES) return undefined;
  const [v0, v1, e0, e1] = head.subarray(124, 128);
  if (e0 === 0x49 && e1 === 0x4d && v0 === 0x00 && v1 === 0x01) return "little";
  if (e0 === 0x4d && e1 === 0x49 && v0 === 0x01 && v1 === 0x00) return "big";
  return undefined;
}

/** A data element's tag. */
export interface ElementTag {
  /** Data type (miINT8 …). */
  readonly type: number;
  /** Bytes of data, without padding. */
  readonly bytes: number;
  /** Offset of the data (relative to the same origin as the tag's). */
  readonly dataAt: number;
  /** Offset of the next element (after the padding; compressed elements have none). */
  readonly next: number;
}

/**
 * The tag at `at` in `view`: the small-element form when the upper 16 bits
 * of the first word are not 0 (bytes there, type below, data in the next 4
 * bytes), else type and byte count in two words.
 *
 * @example
 * ```ts
 * import { readTag } from "./mat5_elements.ts";
 * const v = new DataView(new Uint8Array([1, 0, 1, 0, 0x73, 0, 0, 0]).buffer);
 * const t = readTag(v, 0, true); // a small miINT8 element of 1 byte: "s"
 * if (t.type !== 1 || t.bytes !== 1 || t.dataAt !== 4 || t.next !== 8) throw new Error();
 * ```
 */
export function readTag(view: DataView, at: number, littleEndian: boolean): ElementTag {
  const word = view.getUint32(at, littleEndian);
  if (word >>> 16 !== 0) {
    return { type: word & 0xffff, bytes: word >>> 16, dataAt: at + 4, next: at + 8 };
  }
  const bytes = view.getUint32(at + 4, littleEndian);
  const padded = word === MI.COMPRESSED ? bytes : Math.ceil(bytes / 8) * 8;
  return { type: word, bytes, dataAt: at + 8, next: at + 8 + padded };
}

/** The header of an miMATRIX element: what a variable is, and where its real part's data is. */
export interface MatrixHeader {
  /** mxCLASS number. */
  readonly classId: number;
  readonly complex: boolean;
  readonly logical: boolean;
  readonly dims: readonly number[];
  readonly name: string;
  /**
   * The real part of a numeric or char array: its data type, its offset
   * from the start of the miMATRIX element's data, and its bytes; null for
   * other classes.
   */
  readonly real: { readonly type: number; readonly at: number; readonly bytes: number } | null;
}

/** Outcome of parsing a header from the bytes at hand: done, or more bytes are needed. */
export type HeaderParse = MatrixHeader | "more";

/**
 * The header of the miMATRIX element whose data (after its tag) starts at
 * `bytes[0]` and holds `size` bytes; "more" when `bytes` ends before the
 * header does (and `size` reaches further). `fail` names the fault.
 *
 * @example
 * ```ts
 * import { parseMatrixHeader } from "./mat5_elements.ts";
 * // Array flags (double), dimensions 1×2, name "x" (small element), then 16 bytes of miDOUBLE.
 * const w = new Uint32Array([6, 8, 6, 0, 5, 8, 1, 2, 0x00010001, 0x78, 9, 16, 0, 0, 0, 0]);
 * const h = parseMatrixHeader(new Uint8Array(w.buffer), 64, true, (d) => { throw new Error(d); });
 * if (h === "more" || h.name !== "x" || h.dims[1] !== 2 || h.real?.at !== 48) throw new Error();
 * ```
 */
export function parseMatrixHeader(
  bytes: Uint8Array,
  size: number,
  littleEndian: boolean,
  fail: (detail: string) => never,
): HeaderParse {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const available = Math.min(bytes.length, size);
  let at = 0;
  /** The next subelement's tag, or "more" / a failure when it is not all there. */
  const next = (what: string): ElementTag | "more" => {
    if (at + 8 > available) return at + 8 > size ? fail(`no room for its ${what}`) : "more";
    const tag = readTag(view, at, littleEndian);
    if (tag.dataAt + tag.bytes > size) {
      fail(`its ${what} (${tag.bytes} bytes) runs past the end of the element`);
    }
    return tag;
  };
  const flags = next("array flags");
  if (flags === "more") return "more";
  if (flags.type !== MI.UINT32 || flags.bytes < 8) {
    fail("its array flags are not 8 bytes of miUINT32");
  }
  const word = view.getUint32(flags.dataAt, littleEndian);
  const classId = word & 0xff;
  const flagBits = (word >>> 8) & 0xff;
  at = flags.next;
  const dimsTag = next("dimensions");
  if (dimsTag === "more" || dimsTag.dataAt + dimsTag.bytes > available) return "more";
  if (dimsTag.type !== MI.INT32 || dimsTag.bytes % 4 !== 0 || dimsTag.bytes < 8) {
    fail("its dimensions are not two or more miINT32 values");
  }
  const dims: number[] = [];
  for (let i = 0; i < dimsTag.bytes / 4; i++) {
    const d = view.getInt32(dimsTag.dataAt + 4 * i, littleEndian);
    if (d < 0) fail(`its dimension ${i + 1} is negative (${d})`);
    dims.push(d);
  }
  at = dimsTag.next;
  const nameTag = next("name");
  if (nameTag === "more" || nameTag.dataAt + nameTag.bytes > available) return "more";
  if (nameTag.type !== MI.INT8 && nameTag.type !== MI.UINT8 && nameTag.type !== MI.UTF8) {
    fail(`its name is of data type ${nameTag.type}, not miINT8`);
  }
  const name = new TextDecoder().decode(
    bytes.subarray(nameTag.dataAt, nameTag.dataAt + nameTag.bytes),
  );
  at = nameTag.next;
  const base = {
    classId,
    complex: (flagBits & 0x08) !== 0,
    logical: (flagBits & 0x02) !== 0,
    dims,
    name,
  };
  if (!isNumericClass(classId) && classId !== CHAR_CLASS) return { ...base, real: null };
  const realTag = next("real part");
  if (realTag === "more") return "more";
  return { ...base, real: { type: realTag.type, at: realTag.dataAt, bytes: realTag.bytes } };
}

/**
 * Decodes `count` values of data type `type` from `bytes` (at offset 0) into
 * `out` as numbers (64-bit integers exact to 2^53).
 *
 * @example
 * ```ts
 * import { decodeValues, MI } from "./mat5_elements.ts";
 * const out = new Float64Array(2);
 * decodeValues(new Uint8Array([0xff, 0xfe, 0x00, 0x02]), MI.INT16, 2, false, out);
 * if (out[0] !== -2 || out[1] !== 2) throw new Error();
 * ```
 */
export function decodeValues(
  bytes: Uint8Array,
  type: number,
  count: number,
  littleEndian: boolean,
  out: Float64Array,
): void {
  // Same byte order as the machine and aligned: a typed-array view and one tight loop.
  if (littleEndian === LITTLE_ENDIAN_MACHINE && bytes.byteOffset % (MI_SIZE[type] ?? 1) === 0) {
    const b = bytes.buffer, o = bytes.byteOffset;
    const typed = type === MI.DOUBLE
      ? new Float64Array(b, o, count)
      : type === MI.SINGLE
      ? new Float32Array(b, o, count)
      : type === MI.INT16
      ? new Int16Array(b, o, count)
      : type === MI.INT32
      ? new Int32Array(b, o, count)
      : type === MI.INT8
      ? new Int8Array(b, o, count)
      : type === MI.UINT8
      ? new Uint8Array(b, o, count)
      : type === MI.UINT16
      ? new Uint16Array(b, o, count)
      : type === MI.UINT32
      ? new Uint32Array(b, o, count)
      : undefined;
    if (typed !== undefined) {
      for (let i = 0; i < count; i++) out[i] = typed[i];
      return;
    }
  }
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const le = littleEndian;
  const read: (at: number) => number = type === MI.DOUBLE
    ? (at) => v.getFloat64(at, le)
    : type === MI.SINGLE
    ? (at) => v.getFloat32(at, le)
    : type === MI.INT8
    ? (at) => v.getInt8(at)
    : type === MI.UINT8
    ? (at) => v.getUint8(at)
    : type === MI.INT16
    ? (at) => v.getInt16(at, le)
    : type === MI.UINT16
    ? (at) => v.getUint16(at, le)
    : type === MI.INT32
    ? (at) => v.getInt32(at, le)
    : type === MI.UINT32
    ? (at) => v.getUint32(at, le)
    : type === MI.INT64
    ? (at) => Number(v.getBigInt64(at, le))
    : (at) => Number(v.getBigUint64(at, le));
  const size = MI_SIZE[type];
  for (let i = 0; i < count; i++) out[i] = read(i * size);
}

const LITTLE_ENDIAN_MACHINE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
// A leading U+FEFF in a char array is a character of the text, not a byte order mark.
const UTF16LE = new TextDecoder("utf-16le", { ignoreBOM: true });
const UTF16BE = new TextDecoder("utf-16be", { ignoreBOM: true });

/**
 * The text of a char array's data (miUTF8, miINT8/miUINT8 as Latin-1,
 * miUINT16/miUTF16 as UTF-16 code units, miUTF32 as code points; a lone
 * surrogate or a code point past U+10FFFF reads as U+FFFD).
 *
 * @example
 * ```ts
 * import { decodeChars, MI } from "./mat5_elements.ts";
 * if (decodeChars(new Uint8Array([0x6d, 0, 0x2f, 0, 0x73, 0]), MI.UINT16, true) !== "m/s") throw new Error();
 * ```
 */
export function decodeChars(bytes: Uint8Array, type: number, littleEndian: boolean): string {
  // Decoded whole by TextDecoder, never spread as String.fromCharCode's arguments: that
  // overflows the stack for a long text variable.
  if (type === MI.UTF8) return new TextDecoder().decode(bytes);
  if (type === MI.INT8 || type === MI.UINT8) return latin1(bytes);
  if (type === MI.UINT16 || type === MI.UTF16) {
    const decoder = littleEndian ? UTF16LE : UTF16BE;
    return decoder.decode(bytes.subarray(0, bytes.length - (bytes.length % 2)));
  }
  // miUTF32: each code point as one UTF-16 code unit, or a surrogate pair above U+FFFF
  // (U+FFFD for a value past U+10FFFF).
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const count = Math.floor(bytes.length / 4);
  const units = new Uint16Array(2 * count);
  let n = 0;
  for (let i = 0; i < count; i++) {
    const c = v.getUint32(4 * i, littleEndian);
    if (c < 0x10000) {
      units[n++] = c;
    } else if (c <= 0x10ffff) {
      units[n++] = 0xd800 + ((c - 0x10000) >> 10);
      units[n++] = 0xdc00 + ((c - 0x10000) & 0x3ff);
    } else {
      units[n++] = 0xfffd;
    }
  }
  return utf16Text(units.subarray(0, n));
}
