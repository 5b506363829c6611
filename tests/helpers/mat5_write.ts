/**
 * A minimal MAT v5 writer for tests and the bench (little-endian; real
 * double row vectors and scalars, and 1×n char rows as miUINT16 code units
 * (as MATLAB writes them) or miUTF8, each element plain or compressed), typed
 * from MATLAB's documented Level 5 layout: 128-byte header (text, version
 * 0x0100, "IM"), then per variable an miMATRIX element (array flags,
 * dimensions, name, real part), each subelement padded to 8 bytes; a
 * compressed variable is that element deflated (zlib) inside miCOMPRESSED.
 */
import { deflateSync } from "node:zlib";

const MI_INT8 = 1, MI_UINT16 = 4, MI_UINT32 = 6, MI_INT32 = 5, MI_DOUBLE = 9, MI_MATRIX = 14;
const MI_COMPRESSED = 15, MI_UTF8 = 16, MX_CHAR = 4, MX_DOUBLE = 6;

/** The 128-byte header of a little-endian MAT v5 file. */
export function mat5Header(): Uint8Array {
  const h = new Uint8Array(128).fill(0x20);
  h.set(new TextEncoder().encode("MATLAB 5.0 MAT-file, quiver test writer"), 0);
  h.fill(0, 116, 124);
  h.set([0x00, 0x01, 0x49, 0x4d], 124);
  return h;
}

function sub(type: number, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(8 + Math.ceil(data.length / 8) * 8);
  const v = new DataView(out.buffer);
  v.setUint32(0, type, true);
  v.setUint32(4, data.length, true);
  out.set(data, 8);
  return out;
}

function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** One miMATRIX element of a 1×n row: class, then the real part as `type` elements. */
function rowVariable(
  name: string,
  classId: number,
  n: number,
  type: number,
  data: Uint8Array,
  compress: boolean,
): Uint8Array {
  const flags = new Uint8Array(8);
  new DataView(flags.buffer).setUint32(0, classId, true);
  const dims = new Uint8Array(8);
  new DataView(dims.buffer).setInt32(0, 1, true);
  new DataView(dims.buffer).setInt32(4, n, true);
  const body = concat([
    sub(MI_UINT32, flags),
    sub(MI_INT32, dims),
    sub(MI_INT8, new TextEncoder().encode(name)),
    sub(type, data),
  ]);
  const element = sub(MI_MATRIX, body);
  if (!compress) return element;
  const z = deflateSync(element);
  const out = new Uint8Array(8 + z.length); // a compressed element is not padded
  new DataView(out.buffer).setUint32(0, MI_COMPRESSED, true);
  new DataView(out.buffer).setUint32(4, z.length, true);
  out.set(z, 8);
  return out;
}

/** One variable: a 1×n double row vector (a scalar when n is 1), optionally compressed. */
export function mat5Variable(name: string, values: Float64Array, compress: boolean): Uint8Array {
  const data = new Uint8Array(values.buffer, values.byteOffset, values.byteLength);
  return rowVariable(name, MX_DOUBLE, values.length, MI_DOUBLE, data, compress);
}

/** One variable: a 1×n char row, its UTF-16 code units as miUINT16 or its UTF-8 as miUTF8. */
export function mat5CharVariable(
  name: string,
  text: string,
  type: "uint16" | "utf8",
  compress: boolean,
): Uint8Array {
  if (type === "utf8") {
    return rowVariable(
      name,
      MX_CHAR,
      text.length,
      MI_UTF8,
      new TextEncoder().encode(text),
      compress,
    );
  }
  const data = new Uint8Array(2 * text.length);
  const view = new DataView(data.buffer);
  for (let i = 0; i < text.length; i++) view.setUint16(2 * i, text.charCodeAt(i), true);
  return rowVariable(name, MX_CHAR, text.length, MI_UINT16, data, compress);
}

/** A variable to write: a double row vector, or a char row (`text`, stored as `type`). */
export type Mat5TestVariable =
  | { name: string; values: Float64Array }
  | { name: string; text: string; type: "uint16" | "utf8" };

/** A whole file in memory: header, then the variables in order. */
export function mat5File(
  variables: readonly Mat5TestVariable[],
  compress: boolean,
): Uint8Array {
  return concat([
    mat5Header(),
    ...variables.map((v) =>
      "text" in v
        ? mat5CharVariable(v.name, v.text, v.type, compress)
        : mat5Variable(v.name, v.values, compress)
    ),
  ]);
}
