/**
 * A minimal PNG encoder for the report's colour maps: 8-bit RGB, no
 * interlace, filter 0 on every row, one zlib stream (node:zlib). A map is
 * one raster image instead of one SVG rectangle per cell, so a spectrogram
 * of 200 000 cells costs kilobytes, not megabytes. Format: PNG
 * (ISO/IEC 15948:2004, W3C PNG Second Edition).
 *
 * @module
 */
import { deflateSync } from "node:zlib";

const CRC_TABLE = (() => {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

/**
 * CRC-32 (ISO 3309 / ITU-T V.42, reflected polynomial 0xEDB88320), as PNG
 * chunks carry it.
 *
 * @example
 * ```ts
 * import { crc32 } from "./png.ts";
 * if (crc32(new TextEncoder().encode("123456789")) !== 0xcbf43926) throw new Error();
 * ```
 */
export function crc32(bytes: Uint8Array, seed = 0): number {
  let c = ~seed >>> 0;
  for (let i = 0; i < bytes.length; i++) c = CRC_TABLE[(c ^ bytes[i]) & 0xff] ^ (c >>> 8);
  return ~c >>> 0;
}

function chunk(type: string, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(12 + data.length);
  const view = new DataView(out.buffer);
  view.setUint32(0, data.length);
  for (let i = 0; i < 4; i++) out[4 + i] = type.charCodeAt(i);
  out.set(data, 8);
  view.setUint32(8 + data.length, crc32(out.subarray(4, 8 + data.length)));
  return out;
}

/**
 * Encodes an RGB image (row-major from the top, 3 bytes per pixel) as PNG.
 *
 * @throws {RangeError} for a size that does not match the pixels.
 *
 * @example
 * ```ts
 * import { encodePng } from "./png.ts";
 * const png = encodePng(2, 1, new Uint8Array([255, 0, 0, 0, 0, 255]));
 * if (png[1] !== 0x50 || png[2] !== 0x4e || png[3] !== 0x47) throw new Error(); // "PNG"
 * ```
 */
export function encodePng(width: number, height: number, rgb: Uint8Array): Uint8Array {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new RangeError(`a PNG needs a positive integer size, got ${width} × ${height}`);
  }
  if (rgb.length !== width * height * 3) {
    throw new RangeError(`${width} × ${height} RGB pixels need ${width * height * 3} bytes`);
  }
  const raw = new Uint8Array(height * (1 + width * 3));
  for (let row = 0; row < height; row++) {
    // Filter type 0 (none) at the start of each scanline.
    raw.set(rgb.subarray(row * width * 3, (row + 1) * width * 3), row * (1 + width * 3) + 1);
  }
  const header = new Uint8Array(13);
  const view = new DataView(header.buffer);
  view.setUint32(0, width);
  view.setUint32(4, height);
  header.set([8, 2, 0, 0, 0], 8); // bit depth 8, colour type 2 (RGB), deflate, filter 0, no interlace
  const parts = [
    new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk("IHDR", header),
    chunk("IDAT", new Uint8Array(deflateSync(raw))),
    chunk("IEND", new Uint8Array(0)),
  ];
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}
