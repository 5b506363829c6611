/**
 * Where a WAV file's format and samples are: its chunks walked from the
 * header, in RIFF/WAVE and in the 64-bit containers RF64 (EBU Tech 3306) and
 * BW64 (ITU-R BS.2088). Those start "RF64" or "BW64" instead of "RIFF" and
 * carry a `ds64` chunk first (at byte 12) with the 64-bit sizes of the file
 * and of the data chunk; a 32-bit size field of 0xFFFFFFFF means "take the
 * 64-bit size": the data chunk's from ds64, another chunk's from ds64's
 * table. Sizes and offsets are numbers (exact to 2^53), never 32-bit ints.
 *
 * @module
 */
import { latin1 } from "./byte_text.ts";
import { QuiverError } from "../errors.ts";

/** The WAV format code of integer PCM samples. */
export const FORMAT_PCM = 1;
/** The WAV format code of IEEE float samples. */
export const FORMAT_FLOAT = 3;
const FORMAT_EXTENSIBLE = 0xfffe;
/** A 32-bit size field that points to the ds64 chunk's 64-bit size. */
const SIZE_IN_DS64 = 0xffffffff;

/** The sample format of a WAV file's data chunk. */
export interface WavFormat {
  /** 1 integer PCM, 3 IEEE float. */
  readonly code: number;
  readonly channels: number;
  readonly rate: number;
  readonly blockAlign: number;
  readonly bits: number;
}

/** The container: plain RIFF, or one of the 64-bit ones. */
export type WavContainer = "RIFF" | "RF64" | "BW64";

/** What a WAV file's header says: its container, sample format and where the samples are. */
export interface WavLayout {
  readonly container: WavContainer;
  readonly format: WavFormat;
  /** Byte offset of the first sample frame in the file. */
  readonly dataStart: number;
  /** Bytes of sample frames (a whole number of frames). */
  readonly dataBytes: number;
}

function ascii(bytes: Uint8Array, offset: number, length: number): string {
  return latin1(bytes.subarray(offset, offset + length));
}

/**
 * The container named by a file's first bytes when they are a WAV header
 * (RIFF, RF64 or BW64, then WAVE); undefined otherwise.
 *
 * @example
 * ```ts
 * import { wavContainer } from "./wav_layout.ts";
 * if (wavContainer(new TextEncoder().encode("RF64....WAVEds64")) !== "RF64") throw new Error();
 * if (wavContainer(new TextEncoder().encode("time_s,a\n")) !== undefined) throw new Error();
 * ```
 */
export function wavContainer(bytes: Uint8Array): WavContainer | undefined {
  if (bytes.length < 12 || ascii(bytes, 8, 4) !== "WAVE") return undefined;
  const id = ascii(bytes, 0, 4);
  return id === "RIFF" || id === "RF64" || id === "BW64" ? id : undefined;
}

/** A 64-bit little-endian size as a number, refused past 2^53. */
function size64(view: DataView, at: number, what: string, fail: (d: string) => never): number {
  const value = view.getBigUint64(at, true);
  if (value > BigInt(Number.MAX_SAFE_INTEGER)) {
    fail(`${what} of ${value} bytes is past what quiver can address (2^53)`);
  }
  return Number(value);
}

/** The ds64 chunk at byte 12 (EBU Tech 3306 §3.2): 64-bit RIFF and data sizes and the table. */
function readDs64(
  head: Uint8Array,
  view: DataView,
  container: WavContainer,
  fileSize: number,
  fail: (d: string) => never,
): { riff: number; data: number; table: Map<string, number>; end: number } {
  const where = "ds64 chunk at byte 12";
  if (head.length < 20) fail(`truncated: the ${container} header ends before its ${where}`);
  const id = ascii(head, 12, 4);
  if (id !== "ds64") {
    fail(`an ${container} file needs its ds64 chunk first, at byte 12; found "${id}" there`);
  }
  const size = view.getUint32(16, true);
  // riffSize, dataSize, sampleCount (64 bits each) and tableLength (32 bits): 28 bytes.
  if (size < 28) fail(`${where}: ${size} bytes, shorter than the 28 its fields take`);
  if (20 + size > Math.min(head.length, fileSize)) {
    fail(`truncated ${where}: it declares ${size} bytes, the file holds ${fileSize - 20} after it`);
  }
  const riff = size64(view, 20, `${where}: RIFF size`, fail);
  const data = size64(view, 28, `${where}: data size`, fail);
  const entries = view.getUint32(44, true);
  if (28 + entries * 12 > size) {
    fail(`${where}: its table of ${entries} chunk sizes does not fit its ${size} bytes`);
  }
  if (data > riff) {
    fail(`${where}: the data size (${data} bytes) is larger than the RIFF size (${riff} bytes)`);
  }
  const table = new Map<string, number>();
  for (let i = 0; i < entries; i++) {
    const at = 48 + i * 12;
    table.set(ascii(head, at, 4), size64(view, at + 4, `${where}: table entry ${i + 1}`, fail));
  }
  return { riff, data, table, end: 20 + size + (size % 2) };
}

/**
 * Refuses a sample format quiver does not read, through `fail`.
 *
 * @example
 * ```ts
 * import { checkWavFormat } from "./wav_layout.ts";
 * let message = "";
 * checkWavFormat({ code: 1, channels: 2, rate: 8000, blockAlign: 4, bits: 16 }, (d) => { throw new Error(d); });
 * try { checkWavFormat({ code: 1, channels: 2, rate: 8000, blockAlign: 4, bits: 12 }, (d) => { throw new Error(d); }); }
 * catch (e) { message = (e as Error).message; }
 * if (!message.includes("12 bits")) throw new Error(message);
 * ```
 */
export function checkWavFormat(f: WavFormat, fail: (detail: string) => never): void {
  if (f.code !== FORMAT_PCM && f.code !== FORMAT_FLOAT) {
    fail(
      `unsupported WAV encoding (format code ${f.code}); quiver reads integer PCM and IEEE float`,
    );
  }
  const supported = f.code === FORMAT_PCM ? [8, 16, 24, 32] : [32, 64];
  if (!supported.includes(f.bits)) {
    fail(
      `unsupported ${
        f.code === FORMAT_PCM ? "integer PCM" : "float"
      } sample size of ${f.bits} bits; supported: ${supported.join(", ")}`,
    );
  }
  if (f.channels < 1) fail("the fmt chunk declares no channels");
  if (f.rate < 1) fail("the fmt chunk declares a sample rate of 0");
  if (f.blockAlign !== f.channels * f.bits / 8) {
    fail(`block align ${f.blockAlign} does not match ${f.channels} channels of ${f.bits} bits`);
  }
}

/**
 * The layout of a WAV file from its first bytes `head` (the whole file, or
 * enough of it to hold every chunk before the data chunk's samples) and the
 * file's size: container, checked sample format, and the data chunk's
 * offset and size (from ds64 in RF64/BW64).
 *
 * @throws {QuiverError} for a header that is not WAV, a missing, truncated
 * or bad ds64, fmt or data chunk (naming the chunk and its byte offset), or
 * an encoding quiver does not read.
 *
 * @example
 * ```ts
 * import { wavLayout } from "./wav_layout.ts";
 * import { encodeWav } from "./wav.ts";
 * const bytes = encodeWav({ rate: 8000, startTime: 0, channels: [{ name: "a", unit: "FS", data: new Float64Array(10) }] }, "pcm16");
 * const l = wavLayout(bytes, bytes.length);
 * if (l.container !== "RIFF" || l.dataStart !== 44 || l.dataBytes !== 20) throw new Error();
 * ```
 */
export function wavLayout(head: Uint8Array, fileSize: number, file?: string): WavLayout {
  const fail = (detail: string): never => {
    throw new QuiverError(detail, { file });
  };
  const container = wavContainer(head);
  if (container === undefined) return fail("not a RIFF/WAVE file (no RIFF…WAVE header)");
  const view = new DataView(head.buffer, head.byteOffset, head.byteLength);
  const ds64 = container === "RIFF" ? undefined : readDs64(head, view, container, fileSize, fail);
  let format: WavFormat | undefined;
  let offset = ds64?.end ?? 12;
  while (offset + 8 <= head.length) {
    const id = ascii(head, offset, 4);
    let size = view.getUint32(offset + 4, true);
    const start = offset + 8;
    if (ds64 !== undefined && size === SIZE_IN_DS64) {
      const long = id === "data" ? ds64.data : ds64.table.get(id);
      if (long === undefined) {
        fail(
          `chunk "${id}" at byte ${offset} has the size 0xFFFFFFFF, but the ds64 chunk's table does not give it`,
        );
      }
      size = long as number;
    }
    if (id === "fmt ") {
      if (size < 16 || start + size > head.length) {
        fail(`truncated or malformed fmt chunk at byte ${offset}`);
      }
      let code = view.getUint16(start, true);
      if (code === FORMAT_EXTENSIBLE) {
        if (size < 40) fail(`extensible fmt chunk at byte ${offset} is shorter than 40 bytes`);
        // The sub-format GUID starts with the ordinary format code.
        code = view.getUint16(start + 24, true);
      }
      format = {
        code,
        channels: view.getUint16(start + 2, true),
        rate: view.getUint32(start + 4, true),
        blockAlign: view.getUint16(start + 12, true),
        bits: view.getUint16(start + 14, true),
      };
    } else if (id === "data") {
      if (format === undefined) fail("data chunk comes before the fmt chunk");
      const f = format as WavFormat;
      checkWavFormat(f, fail);
      const available = fileSize - start;
      if (size > available) {
        fail(
          `truncated: the data chunk declares ${size} bytes but the file holds ${available} after its header (the chunk is at byte ${offset})`,
        );
      }
      if (size % f.blockAlign !== 0) {
        fail(`data chunk of ${size} bytes is not a whole number of ${f.blockAlign}-byte frames`);
      }
      return { container, format: f, dataStart: start, dataBytes: size };
    }
    offset = start + size + (size % 2);
  }
  const where = head.length < fileSize ? ` in the first ${head.length} bytes` : "";
  return fail(format === undefined ? `no fmt chunk${where}` : `no data chunk${where}`);
}
