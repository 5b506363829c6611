/**
 * RIFF/WAVE reading and writing (and reading RF64/BW64: wav_layout.ts). Integer PCM of 8 (unsigned), 16, 24 and 32
 * bits and IEEE float of 32 and 64 bits, any number of channels, plain or
 * WAVE_FORMAT_EXTENSIBLE headers. Samples come out as fractions of digital
 * full scale (unit `FS`): integers are divided by 2^(bits−1); floats are
 * taken as written. A channel set-up turns them into volts and engineering
 * units.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Recording } from "./recording.ts";
import { FORMAT_FLOAT, FORMAT_PCM, wavContainer, type WavFormat, wavLayout } from "./wav_layout.ts";

/** Sample encodings the writer produces. */
export type WavEncoding = "pcm16" | "pcm24" | "pcm32" | "float32";

/** The unit of samples read from a WAV file: fraction of digital full scale. */
export const FULL_SCALE_UNIT = "FS";

export { FORMAT_FLOAT, type WavFormat } from "./wav_layout.ts";

/**
 * True when the bytes start with a WAV header: RIFF/WAVE, or RF64 or BW64
 * (the 64-bit containers, wav_layout.ts).
 *
 * @example
 * ```ts
 * import { looksLikeWav } from "./wav.ts";
 * if (looksLikeWav(new TextEncoder().encode("time_s,a\n"))) throw new Error();
 * ```
 */
export function looksLikeWav(bytes: Uint8Array): boolean {
  return wavContainer(bytes) !== undefined;
}

/**
 * Decodes a WAV file into a recording with channels `ch1` … `chN` in unit
 * `FS`.
 *
 * @throws {QuiverError} for a file that is not WAV, is truncated, or uses an
 * encoding quiver does not read.
 *
 * @example
 * ```ts
 * import { encodeWav, parseWav } from "./wav.ts";
 * const rec = { rate: 8000, startTime: 0, channels: [{ name: "ch1", unit: "FS", data: new Float64Array([0, 0.5, -0.5]) }] };
 * const back = parseWav(encodeWav(rec, "pcm16"));
 * if (back.channels[0].data[1] !== 0.5) throw new Error();
 * ```
 */
export function parseWav(bytes: Uint8Array, file?: string): Recording {
  const { format, dataStart, dataBytes } = wavLayout(bytes, bytes.length, file);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return decodeFrames({
    view,
    start: dataStart,
    frames: dataBytes / format.blockAlign,
    f: format,
    file,
  });
}

/**
 * Decodes `frames` frames starting at byte `start` of `view` into `out`
 * (one array per channel, each at least `frames` long, or undefined for a
 * channel not to decode), as fractions of full scale. Allocates no sample
 * array: the chunked reader reuses its arrays.
 *
 * @returns true when every decoded sample is known to be finite (integer
 * PCM always is; aligned float samples are checked as they are copied);
 * false when some may not be: the caller then refuses them with
 * {@linkcode refuseNonFiniteSamples}, which names the first.
 *
 * @example
 * ```ts
 * import { decodeWavFrames, encodeWav } from "./wav.ts";
 * import { wavLayout } from "./wav_layout.ts";
 * const rec = { rate: 8, startTime: 0, channels: [{ name: "a", unit: "FS", data: new Float64Array([0.5, -0.25]) }] };
 * const bytes = encodeWav(rec, "float32");
 * const { format, dataStart } = wavLayout(bytes, bytes.length);
 * const out = [new Float64Array(2)];
 * const finite = decodeWavFrames(new DataView(bytes.buffer), { start: dataStart, count: 2, format, out });
 * if (!finite || out[0][1] !== -0.25) throw new Error();
 * ```
 */
export function decodeWavFrames(
  view: DataView,
  frames: {
    /** Byte offset of the first frame in `view`. */
    start: number;
    /** Frames to decode. */
    count: number;
    /** The file's format. */
    format: WavFormat;
    /** One array per channel, each at least `count` long; undefined: not decoded. */
    out: readonly (Float64Array | undefined)[];
  },
): boolean {
  const { start, count, format: f, out } = frames;
  const bytesPerSample = f.bits / 8;
  const aligned = decodeAligned(view, start, count, f, out);
  if (aligned !== undefined) return aligned;
  for (let i = 0; i < count; i++) {
    for (let c = 0; c < f.channels; c++) {
      const o = out[c];
      if (o !== undefined) {
        o[i] = readSample(view, start + i * f.blockAlign + c * bytesPerSample, f.code, f.bits);
      }
    }
  }
  return f.code !== FORMAT_FLOAT;
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * The common encodings through a typed-array view of the frames, one tight
 * loop per channel: the same values as {@linkcode readSample} (a float32 or
 * int16 read is exact either way) at several times its speed. Undefined when
 * the machine or the alignment does not allow a view (the caller then
 * decodes sample by sample); otherwise whether every sample is finite (float
 * samples are checked as they are copied).
 */
function decodeAligned(
  view: DataView,
  start: number,
  count: number,
  f: WavFormat,
  out: readonly (Float64Array | undefined)[],
): boolean | undefined {
  const at = view.byteOffset + start;
  const bytes = f.bits / 8;
  if (!LITTLE_ENDIAN || at % bytes !== 0 || f.blockAlign !== bytes * f.channels) return undefined;
  const length = count * f.channels;
  if (f.code === FORMAT_FLOAT) {
    return f.bits === 32
      ? copyFloats(new Float32Array(view.buffer, at, length), f.channels, count, out)
      : copyFloats(new Float64Array(view.buffer, at, length), f.channels, count, out);
  }
  // Multiplying by a power of two is exact: the same value as the division in readSample.
  if (f.bits === 16) {
    scaleIntegers(new Int16Array(view.buffer, at, length), 1 / 32768, f.channels, count, out);
  } else if (f.bits === 32) {
    scaleIntegers(new Int32Array(view.buffer, at, length), 1 / 2147483648, f.channels, count, out);
  } else {
    return undefined;
  }
  return true;
}

/**
 * Interleaved float samples into one array per channel; whether all were
 * finite (`v - v` is 0 for a finite v, NaN otherwise: one test per sample,
 * the samples themselves copied untouched).
 */
function copyFloats(
  samples: Float32Array | Float64Array,
  channels: number,
  count: number,
  out: readonly (Float64Array | undefined)[],
): boolean {
  let finite = true;
  for (let c = 0; c < channels; c++) {
    const o = out[c];
    if (o === undefined) continue;
    for (let i = 0, j = c; i < count; i++, j += channels) {
      const v = samples[j];
      o[i] = v;
      if (v - v !== 0) finite = false;
    }
  }
  return finite;
}

/** Interleaved integer codes into one array per channel, each times `scale`. */
function scaleIntegers(
  samples: Int16Array | Int32Array,
  scale: number,
  channels: number,
  count: number,
  out: readonly (Float64Array | undefined)[],
): void {
  for (let c = 0; c < channels; c++) {
    const o = out[c];
    if (o === undefined) continue;
    for (let i = 0, j = c; i < count; i++, j += channels) o[i] = samples[j] * scale;
  }
}

/**
 * Refuses a NaN or infinite sample among the first `frames` of `decoded`
 * (only float WAV files can hold them; a channel left undefined was not
 * decoded and is passed over), naming the channel and the sample
 * (0-based, counted from `firstFrame`), as the CSV reader refuses such cells.
 *
 * @throws {QuiverError} at the first such sample in file order.
 *
 * @example
 * ```ts
 * import { refuseNonFiniteSamples } from "./wav.ts";
 * let message = "";
 * try { refuseNonFiniteSamples([new Float64Array([0, 0.5]), new Float64Array([0, NaN])], 2, 10); }
 * catch (e) { message = (e as Error).message; }
 * if (!message.includes("ch2") || !message.includes("sample 11")) throw new Error(message);
 * ```
 */
export function refuseNonFiniteSamples(
  decoded: readonly (Float64Array | undefined)[],
  frames: number,
  firstFrame = 0,
  file?: string,
): void {
  for (let i = 0; i < frames; i++) {
    for (let c = 0; c < decoded.length; c++) {
      const v = decoded[c]?.[i] ?? 0;
      if (v - v !== 0) {
        throw new QuiverError(
          `channel ch${c + 1}, sample ${firstFrame + i}: ${v} is not a finite number`,
          { file },
        );
      }
    }
  }
}

function decodeFrames(
  { view, start, frames, f, file }: {
    view: DataView;
    start: number;
    frames: number;
    f: WavFormat;
    file?: string;
  },
): Recording {
  const data = Array.from({ length: f.channels }, () => new Float64Array(frames));
  if (!decodeWavFrames(view, { start, count: frames, format: f, out: data })) {
    refuseNonFiniteSamples(data, frames, 0, file);
  }
  return {
    rate: f.rate,
    startTime: 0,
    channels: data.map((d, c) => ({ name: `ch${c + 1}`, unit: FULL_SCALE_UNIT, data: d })),
  };
}

function readSample(view: DataView, at: number, code: number, bits: number): number {
  if (code === FORMAT_FLOAT) {
    return bits === 32 ? view.getFloat32(at, true) : view.getFloat64(at, true);
  }
  switch (bits) {
    case 8:
      return (view.getUint8(at) - 128) / 128;
    case 16:
      return view.getInt16(at, true) / 32768;
    case 24: {
      const u = view.getUint8(at) | (view.getUint8(at + 1) << 8) | (view.getUint8(at + 2) << 16);
      return (u >= 0x800000 ? u - 0x1000000 : u) / 8388608;
    }
    default:
      return view.getInt32(at, true) / 2147483648;
  }
}

/**
 * Encodes a recording as a WAV file. Samples are fractions of full scale;
 * integer encodings need every sample in [−1, 1) and refuse others rather
 * than clip them.
 *
 * @throws {RangeError} for a sample outside full scale or a non-integer rate.
 *
 * @example
 * ```ts
 * import { encodeWav } from "./wav.ts";
 * const rec = { rate: 8000, startTime: 0, channels: [{ name: "a", unit: "FS", data: new Float64Array(10) }] };
 * if (encodeWav(rec, "pcm24").length !== 44 + 30) throw new Error();
 * ```
 */
export function encodeWav(recording: Recording, encoding: WavEncoding): Uint8Array {
  const bits = encoding === "pcm16" ? 16 : encoding === "pcm24" ? 24 : 32;
  const isFloat = encoding === "float32";
  if (!Number.isInteger(recording.rate) || recording.rate < 1) {
    throw new RangeError(`WAV needs a whole-number sample rate, got ${recording.rate}`);
  }
  const channels = recording.channels.length;
  const frames = recording.channels[0]?.data.length ?? 0;
  const blockAlign = channels * bits / 8;
  const dataBytes = frames * blockAlign;
  const bytes = new Uint8Array(44 + dataBytes + (dataBytes % 2));
  const view = new DataView(bytes.buffer);
  const writeAscii = (at: number, s: string) => {
    for (let i = 0; i < s.length; i++) bytes[at + i] = s.charCodeAt(i);
  };
  writeAscii(0, "RIFF");
  view.setUint32(4, bytes.length - 8, true);
  writeAscii(8, "WAVE");
  writeAscii(12, "fmt ");
  view.setUint32(16, 16, true);
  view.setUint16(20, isFloat ? FORMAT_FLOAT : FORMAT_PCM, true);
  view.setUint16(22, channels, true);
  view.setUint32(24, recording.rate, true);
  view.setUint32(28, recording.rate * blockAlign, true);
  view.setUint16(32, blockAlign, true);
  view.setUint16(34, bits, true);
  writeAscii(36, "data");
  view.setUint32(40, dataBytes, true);
  const full = 2 ** (bits - 1);
  for (let c = 0; c < channels; c++) {
    const data = recording.channels[c].data;
    for (let i = 0; i < frames; i++) {
      const at = 44 + i * blockAlign + c * bits / 8;
      const x = data[i];
      if (isFloat) {
        view.setFloat32(at, x, true);
        continue;
      }
      const q = Math.round(x * full);
      if (!(q >= -full && q < full)) {
        throw new RangeError(
          `sample ${i} of channel "${
            recording.channels[c].name
          }" is ${x}, outside the ${bits}-bit full scale [-1, 1)`,
        );
      }
      if (bits === 16) view.setInt16(at, q, true);
      else if (bits === 32) view.setInt32(at, q, true);
      else {
        const u = q < 0 ? q + 0x1000000 : q;
        bytes[at] = u & 0xff;
        bytes[at + 1] = (u >> 8) & 0xff;
        bytes[at + 2] = (u >> 16) & 0xff;
      }
    }
  }
  return bytes;
}
