/**
 * A minimal MAT v5 writer for tests and the bench (little-endian; real
 * double row vectors and scalars, each element plain or compressed), typed
 * from MATLAB's documented Level 5 layout: 128-byte header (text, version
 * 0x0100, "IM"), then per variable an miMATRIX element (array flags,
 * dimensions, name, real part), each subelement padded to 8 bytes; a
 * compressed variable is that element deflated (zlib) inside miCOMPRESSED.
 */
import { deflateSync } from "node:zlib";

const MI_INT8 = 1, MI_UINT32 = 6, MI_INT32 = 5, MI_DOUBLE = 9, MI_MATRIX = 14;
const MI_COMPRESSED = 15, MX_DOUBLE = 6;

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

/** One variable: a 1×n double row vector (a scalar when n is 1), optionally compressed. */
export function mat5Variable(name: string, values: Float64Array, compress: boolean): Uint8Array {
  const flags = new Uint8Array(8);
  new DataView(flags.buffer).setUint32(0, MX_DOUBLE, true);
  const dims = new Uint8Array(8);
  new DataView(dims.buffer).setInt32(0, 1, true);
  new DataView(dims.buffer).setInt32(4, values.length, true);
  const body = concat([
    sub(MI_UINT32, flags),
    sub(MI_INT32, dims),
    sub(MI_INT8, new TextEncoder().encode(name)),
    sub(MI_DOUBLE, new Uint8Array(values.buffer, values.byteOffset, values.byteLength)),
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

/** A whole file in memory: header, then the variables in order. */
export function mat5File(
  variables: readonly { name: string; values: Float64Array }[],
  compress: boolean,
): Uint8Array {
  return concat([mat5Header(), ...variables.map((v) => mat5Variable(v.name, v.values, compress))]);
}
