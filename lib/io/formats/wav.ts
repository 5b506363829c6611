/**
 * WAV recordings (RIFF/WAVE, and RF64/BW64 beyond 4 GB: wav_layout.ts;
 * integer PCM and IEEE float, wav.ts): the header is read at opening, then the data chunk frame block by frame block, each
 * decoded into the chunk's arrays. Channels are `ch1` … `chN` in fractions
 * of full scale until a set-up names them; integer PCM carries its
 * converter's rails (for the clipping check).
 *
 * @module
 */
import { open } from "node:fs/promises";
import { QuiverError } from "../../errors.ts";
import { CHUNK_ROWS, type RecordingStream } from "../recording_source.ts";
import { decodeWavFrames, FORMAT_FLOAT, FULL_SCALE_UNIT, refuseNonFiniteSamples } from "../wav.ts";
import { type WavContainer, wavLayout } from "../wav_layout.ts";
import { WAV_HEAD } from "./signatures.ts";
import {
  channelTransforms,
  type FormatOptions,
  type RecordingDescription,
  type RecordingFormat,
  refuseGroup,
} from "./format.ts";

/** A WAV stream and the container its header names (RIFF, RF64, BW64). */
async function openWavWithContainer(
  path: string,
  options: FormatOptions,
): Promise<RecordingStream & { container: WavContainer }> {
  const handle = await open(path, "r");
  try {
    const size = (await handle.stat()).size;
    const head = new Uint8Array(Math.min(size, 1 << 20));
    await handle.read(head, 0, head.length, 0);
    const layout = wavLayout(head, size, path);
    const fail = (detail: string): never => {
      throw new QuiverError(detail, { file: path }, "usage");
    };
    if (options.rate !== undefined) fail("a WAV file states its own sample rate; do not give one");
    if (options.timeColumn !== undefined) {
      fail("a WAV file has no time column; do not name one (--time-column)");
    }
    refuseGroup(options, "WAV", path);
    const { dataStart, dataBytes, format: f } = layout;
    const frames = dataBytes / f.blockAlign;
    const transforms = await channelTransforms(
      Array.from({ length: f.channels }, (_, c) => ({ name: `ch${c + 1}`, unit: FULL_SCALE_UNIT })),
      options,
    );
    return {
      container: layout.container,
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
          // One byte buffer and one sample array per selected channel, reused for every chunk;
          // the other channels are not decoded (nor checked: their samples concern no result).
          const rows = Math.min(CHUNK_ROWS, frames);
          const bytes = new Uint8Array(rows * f.blockAlign);
          const view = new DataView(bytes.buffer);
          const samples = new Array<Float64Array | undefined>(f.channels);
          for (const s of selected) samples[s] ??= new Float64Array(rows);
          // A channel selected twice is scaled once and handed on as a copy the second time
          // (each array of a chunk its own, as the caller may change it in place).
          const copies = selected.map((s, j) =>
            selected.indexOf(s) === j ? undefined : new Float64Array(rows)
          );
          const distinct = selected.filter((s, j) => selected.indexOf(s) === j);
          for (let first = 0; first < frames; first += CHUNK_ROWS) {
            const count = Math.min(CHUNK_ROWS, frames - first);
            await h.read(bytes, 0, count * f.blockAlign, dataStart + first * f.blockAlign);
            if (!decodeWavFrames(view, { start: 0, count, format: f, out: samples })) {
              refuseNonFiniteSamples(samples, count, first, path);
            }
            for (const s of distinct) {
              const factor = transforms[s].factor, d = samples[s]!;
              if (factor !== 1) { for (let i = 0; i < count; i++) d[i] *= factor; }
            }
            onChunk(selected.map((s, j) => {
              const d = samples[s]!.subarray(0, count), copy = copies[j];
              if (copy === undefined) return d;
              copy.set(d);
              return copy.subarray(0, count);
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
  const stream = await openWavWithContainer(path, options);
  return {
    delimiter: null,
    decimalMark: null,
    timeColumn: null,
    rate: stream.rate,
    rateFrom: `the ${stream.container === "RIFF" ? "WAV" : stream.container} header`,
    startTime: stream.startTime,
    samples: stream.length,
    channels: stream.channels.map((c, i) => ({ position: i + 1, name: c.name, unit: c.unit })),
    positionName: "channel",
    ...(stream.container !== "RIFF" ? { container: stream.container } : {}),
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
  ...WAV_HEAD,
  open: (path, options) => openWavWithContainer(path, options),
  describe: describeWav,
};
