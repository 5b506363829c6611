/**
 * WAV recordings (RIFF/WAVE; integer PCM and IEEE float, wav.ts): the header
 * is read at opening, then the data chunk frame block by frame block, each
 * decoded into the chunk's arrays. Channels are `ch1` … `chN` in fractions
 * of full scale until a set-up names them; integer PCM carries its
 * converter's rails (for the clipping check).
 *
 * @module
 */
import { open } from "node:fs/promises";
import { QuiverError } from "../../errors.ts";
import { CHUNK_ROWS, type RecordingStream } from "../recording_source.ts";
import {
  decodeWavFrames,
  FORMAT_FLOAT,
  looksLikeWav,
  parseWav,
  refuseNonFiniteSamples,
} from "../wav.ts";
import {
  channelTransforms,
  type FormatOptions,
  type RecordingDescription,
  type RecordingFormat,
  refuseGroup,
} from "./format.ts";

async function openWav(
  path: string,
  options: FormatOptions,
): Promise<RecordingStream> {
  const handle = await open(path, "r");
  try {
    const size = (await handle.stat()).size;
    const head = new Uint8Array(Math.min(size, 1 << 20));
    await handle.read(head, 0, head.length, 0);
    if (!looksLikeWav(head)) parseWav(head, path); // throws its precise message
    const view = new DataView(head.buffer);
    let offset = 12;
    let fmt:
      | { code: number; channels: number; rate: number; blockAlign: number; bits: number }
      | undefined;
    let dataStart = -1;
    let dataBytes = 0;
    while (offset + 8 <= head.length) {
      const id = String.fromCharCode(...head.subarray(offset, offset + 4));
      const chunkSize = view.getUint32(offset + 4, true);
      if (id === "data") {
        dataStart = offset + 8;
        dataBytes = chunkSize;
        break;
      }
      if (id === "fmt " && offset + 8 + 16 <= head.length) {
        let code = view.getUint16(offset + 8, true);
        if (code === 0xfffe && offset + 8 + 26 <= head.length) {
          code = view.getUint16(offset + 8 + 24, true);
        }
        fmt = {
          code,
          channels: view.getUint16(offset + 10, true),
          rate: view.getUint32(offset + 12, true),
          blockAlign: view.getUint16(offset + 20, true),
          bits: view.getUint16(offset + 22, true),
        };
      }
      offset += 8 + chunkSize + (chunkSize % 2);
    }
    const fail = (detail: string, kind: "data" | "usage" = "data"): never => {
      throw new QuiverError(detail, { file: path }, kind);
    };
    if (fmt === undefined || dataStart < 0) {
      parseWav(head, path); // a missing or misplaced chunk: its precise message
      fail("no fmt and data chunks in the first MiB of the file");
    }
    const format = fmt as NonNullable<typeof fmt>;
    if (dataStart + dataBytes > size) {
      fail(
        `truncated: the data chunk declares ${dataBytes} bytes but the file holds ${
          size - dataStart
        } after its header`,
      );
    }
    if (format.blockAlign === 0 || dataBytes % format.blockAlign !== 0) {
      fail(
        `data chunk of ${dataBytes} bytes is not a whole number of ${format.blockAlign}-byte frames`,
      );
    }
    if (options.rate !== undefined) {
      fail("a WAV file states its own sample rate; do not give one", "usage");
    }
    if (options.timeColumn !== undefined) {
      fail("a WAV file has no time column; do not name one (--time-column)", "usage");
    }
    refuseGroup(options, "WAV", path);
    const f = format;
    // Validate the format with the in-memory decoder on a header-only copy.
    const probe = new Uint8Array(dataStart + f.blockAlign);
    probe.set(head.subarray(0, dataStart));
    new DataView(probe.buffer).setUint32(dataStart - 4, f.blockAlign, true);
    const decoded = parseWav(probe, path);
    const frames = dataBytes / f.blockAlign;
    const transforms = await channelTransforms(
      decoded.channels.map((c) => ({ name: c.name, unit: c.unit })),
      options,
    );
    return {
      rate: f.rate,
      startTime: 0,
      length: frames,
      channels: transforms.map(({ factor, ...meta }) => {
        if (f.code === FORMAT_FLOAT) return meta;
        // Integer PCM reads as code / 2^(bits−1): its rails are the extreme codes, scaled alike.
        const lsb = 2 ** (1 - f.bits);
        return {
          ...meta,
          fullScale: { low: -factor, high: (1 - lsb) * factor, step: lsb * factor },
        };
      }),
      async read(selected, onChunk) {
        const h = await open(path, "r");
        try {
          // One byte buffer and one sample array per channel, reused for every chunk.
          const rows = Math.min(CHUNK_ROWS, frames);
          const bytes = new Uint8Array(rows * f.blockAlign);
          const view = new DataView(bytes.buffer);
          const samples = Array.from({ length: f.channels }, () => new Float64Array(rows));
          const factors = selected.map((s) => transforms[s].factor);
          for (let first = 0; first < frames; first += CHUNK_ROWS) {
            const count = Math.min(CHUNK_ROWS, frames - first);
            await h.read(bytes, 0, count * f.blockAlign, dataStart + first * f.blockAlign);
            decodeWavFrames(view, { start: 0, count, format: f, out: samples });
            if (f.code === FORMAT_FLOAT) refuseNonFiniteSamples(samples, count, first, path);
            onChunk(selected.map((s, j) => {
              const d = samples[s].subarray(0, count);
              if (factors[j] !== 1) { for (let i = 0; i < d.length; i++) d[i] *= factors[j]; }
              return d;
            }));
          }
        } finally {
          await h.close();
        }
      },
    };
  } finally {
    await handle.close();
  }
}

/** What `quiver info` shows of a WAV file: its header only (the stream is opened, never read). */
async function describeWav(
  path: string,
  options: Omit<FormatOptions, "setup">,
): Promise<RecordingDescription> {
  const stream = await openWav(path, options);
  return {
    delimiter: null,
    decimalMark: null,
    timeColumn: null,
    rate: stream.rate,
    rateFrom: "the WAV header",
    startTime: stream.startTime,
    samples: stream.length,
    channels: stream.channels.map((c, i) => ({ position: i + 1, name: c.name, unit: c.unit })),
    positionName: "channel",
  };
}

/**
 * The WAV format, told by its RIFF/WAVE header.
 *
 * @example
 * ```ts
 * import { wavFormat } from "./wav.ts";
 * import { encodeWav } from "../wav.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const bytes = encodeWav({ rate: 8000, startTime: 0, channels: [{ name: "a", unit: "FS", data: new Float64Array(80) }] }, "pcm16");
 * await writeFile(`${dir}/r.wav`, bytes);
 * const s = await wavFormat.open(`${dir}/r.wav`, {});
 * if (!wavFormat.sniff(bytes) || s.rate !== 8000 || s.length !== 80 || s.channels[0].name !== "ch1") throw new Error();
 * ```
 */
export const wavFormat: RecordingFormat = {
  name: "wav",
  label: "WAV",
  kind: "binary",
  sniff: looksLikeWav,
  open: openWav,
  describe: describeWav,
};
