/**
 * A MAT v5 file's variables found without reading their values: the
 * top-level data elements walked from byte 128 by their tags, each
 * miMATRIX's header read in place, each miCOMPRESSED element inflated only
 * as far as its header (at most 64 KiB of output). Then a variable's values
 * read in chunks: from the file at their offset, or inflated in a stream
 * ({@linkcode Mat5Values}). Faults name the file, the variable (when its
 * name is known) and the element's byte offset.
 *
 * @module
 */
import type { FileHandle } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import {
  decodeChars,
  decodeValues,
  MAT5_HEADER_BYTES,
  type MatrixHeader,
  MI,
  MI_SIZE,
  parseMatrixHeader,
  readTag,
} from "./mat5_elements.ts";
import { InflatedElement, InflateFault } from "./mat5_inflate.ts";

/** Bytes of a variable's header read (or inflated) to find what it is. */
const HEADER_WINDOW = 1 << 16;

/** One variable of the file, as its header says. */
export interface Mat5Variable extends MatrixHeader {
  /** Byte offset of its top-level element's tag. */
  readonly offset: number;
  /** Whether its element is miCOMPRESSED. */
  readonly compressed: boolean;
  /** Offset and length of the compressed bytes (a compressed variable). */
  readonly zlib: { readonly start: number; readonly length: number } | null;
  /**
   * Where its real part's values start: a file offset, or for a compressed
   * variable an offset into the inflated bytes.
   */
  readonly valuesAt: number;
}

/** The file's byte order and its variables in file order. */
export interface Mat5Directory {
  readonly littleEndian: boolean;
  readonly variables: readonly Mat5Variable[];
  /** Top-level elements that are not variables, in words (for `quiver info`). */
  readonly other: readonly string[];
}

/**
 * A QuiverError (data) for the file, the detail naming the element (and
 * variable) and its offset.
 *
 * @example
 * ```ts
 * import { mat5Fault } from "./mat5_file.ts";
 * if (mat5Fault("r.mat", "element at byte 128: cut").message !== "r.mat: element at byte 128: cut") throw new Error();
 * ```
 */
export function mat5Fault(path: string, detail: string): QuiverError {
  return new QuiverError(detail, { file: path });
}

async function readAt(handle: FileHandle, at: number, length: number): Promise<Uint8Array> {
  const bytes = new Uint8Array(length);
  const { bytesRead } = await handle.read(bytes, 0, length, at);
  return bytes.subarray(0, bytesRead);
}

/**
 * Walks the file's top-level elements and reads each variable's header.
 *
 * @throws {QuiverError} for an element that runs past the end of the file,
 * a header that is cut or malformed, or a compressed element that does not
 * inflate.
 *
 * @example
 * ```ts
 * import { Mat5Values, scanMat5, variableAt } from "./mat5_file.ts";
 * import { open, mkdtemp, writeFile } from "node:fs/promises";
 * // Header (version 0x0100, "IM"), then variable "a" = [1, 2]: array flags (double), dimensions
 * // 1×2, name (small element), 16 bytes of miDOUBLE.
 * const head = new Uint8Array(128);
 * head.set([0x00, 0x01, 0x49, 0x4d], 124);
 * const body = new Uint32Array([14, 64, 6, 8, 6, 0, 5, 8, 1, 2, 0x00010001, 0x61, 9, 16, 0, 0x3ff00000, 0, 0x40000000]);
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/a.mat`, new Uint8Array([...head, ...new Uint8Array(body.buffer)]));
 * const handle = await open(`${dir}/a.mat`, "r");
 * const { variables } = await scanMat5(`${dir}/a.mat`, handle, true);
 * const out = new Float64Array(2);
 * await new Mat5Values(`${dir}/a.mat`, handle, variables[0], true, 0, 2).read(out, 2);
 * await handle.close();
 * if (variableAt(variables[0]) !== 'variable "a" (element at byte 128)' || out[1] !== 2) throw new Error();
 * ```
 */
export async function scanMat5(
  path: string,
  handle: FileHandle,
  littleEndian: boolean,
): Promise<Mat5Directory> {
  const size = (await handle.stat()).size;
  const variables: Mat5Variable[] = [];
  const other: string[] = [];
  let offset = MAT5_HEADER_BYTES;
  while (offset < size) {
    const fail = (detail: string): never => {
      throw mat5Fault(path, `element at byte ${offset}: ${detail}`);
    };
    if (offset + 8 > size) fail(`truncated: the file ends inside its tag (at byte ${size})`);
    const tagBytes = await readAt(handle, offset, 8);
    const tag = readTag(new DataView(tagBytes.buffer), 0, littleEndian);
    const end = offset + tag.dataAt + tag.bytes;
    if (end > size) {
      fail(
        `truncated: it declares ${tag.bytes} bytes, past the end of the file (byte ${size})`,
      );
    }
    if (tag.type === MI.MATRIX) {
      const window = await readAt(handle, offset + 8, Math.min(tag.bytes, HEADER_WINDOW));
      const header = parseMatrixHeader(window, tag.bytes, littleEndian, fail);
      if (header === "more") fail(`its header is longer than ${HEADER_WINDOW} bytes`);
      const h = header as MatrixHeader;
      variables.push({
        ...h,
        offset,
        compressed: false,
        zlib: null,
        valuesAt: offset + 8 + (h.real?.at ?? 0),
      });
    } else if (tag.type === MI.COMPRESSED) {
      variables.push(await compressedHeader(path, handle, offset, tag.bytes, littleEndian));
    } else {
      other.push(`element at byte ${offset}: data type ${tag.type} outside any variable`);
    }
    offset = Math.min(offset + tag.next, size); // the last element may lack its padding
  }
  return { littleEndian, variables, other };
}

/** The header of a compressed variable: its stream inflated up to the real part's tag. */
async function compressedHeader(
  path: string,
  handle: FileHandle,
  offset: number,
  length: number,
  littleEndian: boolean,
): Promise<Mat5Variable> {
  const zlib = { start: offset + 8, length };
  const z = new InflatedElement(handle, zlib.start, length, 128);
  const fail = (detail: string): never => {
    throw mat5Fault(path, `compressed element at byte ${offset}: ${detail}`);
  };
  try {
    const window = new Uint8Array(8 + HEADER_WINDOW);
    let got = 0;
    try {
      got = await z.take(window, 8);
      if (got < 8) fail("it inflates to less than one element tag");
      const inner = readTag(new DataView(window.buffer), 0, littleEndian);
      if (inner.type !== MI.MATRIX) fail(`it holds data type ${inner.type}, not a variable`);
      // A few hundred bytes hold a header with a name of up to 63 characters; more when not.
      let header: ReturnType<typeof parseMatrixHeader> = "more";
      for (const want of [256, HEADER_WINDOW]) {
        const target = Math.min(inner.bytes, want) + 8;
        if (got < target) got += await z.take(window.subarray(got), target - got);
        header = parseMatrixHeader(
          window.subarray(8, got),
          inner.bytes,
          littleEndian,
          (d) =>
            fail(
              `${got - 8 < inner.bytes ? "it inflates to fewer bytes than declared; " : ""}${d}`,
            ),
        );
        if (header !== "more") break;
      }
      if (header === "more") fail(`its header is longer than ${HEADER_WINDOW} bytes`);
      const h = header as MatrixHeader;
      return { ...h, offset, compressed: true, zlib, valuesAt: 8 + (h.real?.at ?? 0) };
    } catch (e) {
      if (e instanceof InflateFault) fail(`it does not inflate (${e.message})`);
      throw e;
    }
  } finally {
    z.close();
  }
}

/** How a variable is named in messages: its name and its element's offset (example: {@linkcode scanMat5}). */
export const variableAt = (v: Mat5Variable): string =>
  `variable "${v.name}" (${v.compressed ? "compressed element" : "element"} at byte ${v.offset})`;

/**
 * The values of a variable's real part (or of a stretch of it: one column
 * of a matrix), read in order chunk by chunk: from the file at their offset,
 * or inflated in a stream. Example: {@linkcode scanMat5}.
 */
export class Mat5Values {
  readonly #path: string;
  readonly #variable: Mat5Variable;
  readonly #handle: FileHandle;
  readonly #littleEndian: boolean;
  readonly #size: number;
  #next: number;
  readonly #count: number;
  #inflated: InflatedElement | undefined;
  #bytes = new Uint8Array(0);
  #skip: number;

  /**
   * @param first index of the first value to read (a matrix column's start)
   * @param count values to read
   */
  constructor(
    path: string,
    handle: FileHandle,
    variable: Mat5Variable,
    littleEndian: boolean,
    first: number,
    count: number,
  ) {
    const real = variable.real as NonNullable<Mat5Variable["real"]>;
    this.#path = path;
    this.#variable = variable;
    this.#handle = handle;
    this.#littleEndian = littleEndian;
    this.#size = MI_SIZE[real.type];
    this.#count = count;
    this.#next = 0;
    this.#skip = variable.valuesAt + first * this.#size;
    if (variable.zlib !== null) {
      this.#inflated = new InflatedElement(handle, variable.zlib.start, variable.zlib.length);
    }
  }

  /** Reads the next `n` values into `out[0…n)`. @throws {QuiverError} for a cut or bad element. */
  async read(out: Float64Array, n: number): Promise<void> {
    if (this.#next + n > this.#count) throw new RangeError("read past the values");
    const type = (this.#variable.real as NonNullable<Mat5Variable["real"]>).type;
    const want = n * this.#size;
    if (this.#bytes.length < want) this.#bytes = new Uint8Array(want);
    const bytes = this.#bytes;
    const fail = (detail: string): never => {
      throw mat5Fault(this.#path, `${variableAt(this.#variable)}: ${detail}`);
    };
    let got: number;
    if (this.#inflated === undefined) {
      got = (await this.#handle.read(bytes, 0, want, this.#skip + this.#next * this.#size))
        .bytesRead;
    } else {
      try {
        if (this.#skip > 0) {
          const skipped = await this.#inflated.skip(this.#skip);
          if (skipped < this.#skip) fail("it inflates to fewer bytes than its header declares");
          this.#skip = 0;
        }
        got = await this.#inflated.take(bytes, want);
      } catch (e) {
        if (e instanceof InflateFault) fail(`it does not inflate (${e.message})`);
        throw e;
      }
    }
    if (got < want) {
      fail(
        this.#inflated === undefined
          ? "the file changed while it was read (its values end early)"
          : "it inflates to fewer bytes than its header declares",
      );
    }
    decodeValues(bytes.subarray(0, want), type, n, this.#littleEndian, out);
    this.#next += n;
  }

  /** Stops reading (a compressed variable's stream is dropped). */
  close(): void {
    this.#inflated?.close();
  }
}

/**
 * Every value of a small variable (a scalar), read whole.
 *
 * @example
 * ```ts
 * import { readWhole, scanMat5 } from "./mat5_file.ts";
 * import { open, mkdtemp, writeFile } from "node:fs/promises";
 * // Header (version 0x0100, "IM"), then variable "a" = [1, 2]: array flags (double), dimensions
 * // 1×2, name (small element), 16 bytes of miDOUBLE.
 * const head = new Uint8Array(128);
 * head.set([0x00, 0x01, 0x49, 0x4d], 124);
 * const body = new Uint32Array([14, 64, 6, 8, 6, 0, 5, 8, 1, 2, 0x00010001, 0x61, 9, 16, 0, 0x3ff00000, 0, 0x40000000]);
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/a.mat`, new Uint8Array([...head, ...new Uint8Array(body.buffer)]));
 * const handle = await open(`${dir}/a.mat`, "r");
 * const { variables } = await scanMat5(`${dir}/a.mat`, handle, true);
 * const values = await readWhole(`${dir}/a.mat`, handle, variables[0], true);
 * await handle.close();
 * if (values.length !== 2 || values[0] !== 1) throw new Error();
 * ```
 */
export async function readWhole(
  path: string,
  handle: FileHandle,
  variable: Mat5Variable,
  littleEndian: boolean,
): Promise<Float64Array> {
  const real = variable.real as NonNullable<Mat5Variable["real"]>;
  const count = real.bytes / MI_SIZE[real.type];
  const out = new Float64Array(count);
  const values = new Mat5Values(path, handle, variable, littleEndian, 0, count);
  try {
    await values.read(out, count);
  } finally {
    values.close();
  }
  return out;
}

/**
 * The text of a char variable.
 *
 * @example
 * ```ts
 * import { readText, scanMat5 } from "./mat5_file.ts";
 * import { open, mkdtemp, writeFile } from "node:fs/promises";
 * // Variable "u" = 'V': char class (4), dimensions 1×1, name, one miUTF8 byte (small elements).
 * const head = new Uint8Array(128);
 * head.set([0x00, 0x01, 0x49, 0x4d], 124);
 * const body = new Uint32Array([14, 48, 6, 8, 4, 0, 5, 8, 1, 1, 0x00010001, 0x75, 0x00010010, 0x56]);
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/u.mat`, new Uint8Array([...head, ...new Uint8Array(body.buffer)]));
 * const handle = await open(`${dir}/u.mat`, "r");
 * const { variables } = await scanMat5(`${dir}/u.mat`, handle, true);
 * const text = await readText(`${dir}/u.mat`, handle, variables[0], true);
 * await handle.close();
 * if (text !== "V") throw new Error(text);
 * ```
 */
export async function readText(
  path: string,
  handle: FileHandle,
  variable: Mat5Variable,
  littleEndian: boolean,
): Promise<string> {
  const real = variable.real as NonNullable<Mat5Variable["real"]>;
  let bytes: Uint8Array;
  if (variable.zlib === null) {
    bytes = await readAt(handle, variable.valuesAt, real.bytes);
  } else {
    const z = new InflatedElement(handle, variable.zlib.start, variable.zlib.length);
    try {
      await z.skip(variable.valuesAt);
      bytes = new Uint8Array(real.bytes);
      await z.take(bytes, real.bytes);
    } catch (e) {
      if (e instanceof InflateFault) {
        throw mat5Fault(path, `${variableAt(variable)}: it does not inflate (${e.message})`);
      }
      throw e;
    } finally {
      z.close();
    }
  }
  return decodeChars(bytes, real.type, littleEndian);
}
