/**
 * MAT v5 recordings (MATLAB's Level 5 MAT-file, little- or big-endian, with
 * or without compressed variables): the variables' headers are read at
 * opening (mat5_file.ts) and laid out as a recording (mat5_recording.ts);
 * the channels' values are read chunk by chunk, from the file at their
 * offsets or inflated in a stream, one reader per channel read.
 *
 * @module
 */
import { type FileHandle, open } from "node:fs/promises";
import { QuiverError } from "../../errors.ts";
import { MAT5_HEADER_BYTES, mat5Endian } from "../mat5_elements.ts";
import { Mat5Values, scanMat5, variableAt } from "../mat5_file.ts";
import { type Mat5Layout, mat5Layout } from "../mat5_recording.ts";
import { unreadable } from "../file_kinds.ts";
import { CHUNK_ROWS, type RecordingStream } from "../recording_source.ts";
import {
  channelTransforms,
  type FormatOptions,
  type RecordingDescription,
  type RecordingFormat,
  refuseGroup,
} from "./format.ts";
import { MAT5_HEAD } from "./signatures.ts";

/** The file's layout, found with the file open (closed after). */
async function layoutOf(
  path: string,
  options: Omit<FormatOptions, "setup">,
): Promise<{ layout: Mat5Layout; littleEndian: boolean }> {
  refuseGroup(options, "MAT v5", path);
  let handle: FileHandle;
  try {
    handle = await open(path, "r");
  } catch (error) {
    throw unreadable(path, error);
  }
  try {
    const head = new Uint8Array(MAT5_HEADER_BYTES);
    const { bytesRead } = await handle.read(head, 0, MAT5_HEADER_BYTES, 0);
    const endian = mat5Endian(head.subarray(0, bytesRead));
    if (endian === undefined) {
      throw new QuiverError("not a MAT v5 file (no version 0x0100 header)", { file: path });
    }
    const littleEndian = endian === "little";
    const directory = await scanMat5(path, handle, littleEndian);
    return { layout: await mat5Layout(path, handle, directory, options), littleEndian };
  } finally {
    await handle.close();
  }
}

async function openMat5(path: string, options: FormatOptions): Promise<RecordingStream> {
  const { layout, littleEndian } = await layoutOf(path, options);
  const { channels, length } = layout;
  const transforms = await channelTransforms(
    channels.map((c) => ({ name: c.name, unit: c.unit })),
    options,
  );
  return {
    rate: layout.rate,
    startTime: layout.startTime,
    length,
    channels: transforms.map(({ factor: _f, ...meta }) => meta),
    async read(selected, onChunk) {
      const handle = await open(path, "r");
      const readers = selected.map((s) =>
        new Mat5Values(path, handle, channels[s].variable, littleEndian, channels[s].first, length)
      );
      try {
        // One sample array per channel, reused for every chunk.
        const rows = Math.min(CHUNK_ROWS, length);
        const buffers = selected.map(() => new Float64Array(rows));
        const factors = selected.map((s) => transforms[s].factor);
        for (let first = 0; first < length; first += CHUNK_ROWS) {
          const count = Math.min(CHUNK_ROWS, length - first);
          const chunk: Float64Array[] = [];
          for (let j = 0; j < selected.length; j++) {
            const d = buffers[j].subarray(0, count);
            await readers[j].read(d, count);
            const factor = factors[j];
            for (let i = 0; i < count; i++) {
              const v = d[i];
              if (v - v !== 0) {
                throw new QuiverError(
                  `${variableAt(channels[selected[j]].variable)}, channel "${
                    channels[selected[j]].name
                  }", sample ${first + i}: ${v} is not a finite number`,
                  { file: path },
                );
              }
              if (factor !== 1) d[i] = v * factor;
            }
            chunk.push(d);
          }
          onChunk(chunk);
        }
      } finally {
        for (const r of readers) r.close();
        await handle.close();
      }
    },
  };
}

/**
 * What `quiver info` shows of a MAT v5 file: the variables' headers (a
 * compressed variable is inflated as far as its header), the rate scalars,
 * unit texts and time vector (read whole, the time vector checked); the
 * channels' values are not read.
 */
async function describeMat5(
  path: string,
  options: Omit<FormatOptions, "setup">,
): Promise<RecordingDescription> {
  const { layout } = await layoutOf(path, options);
  return {
    delimiter: null,
    decimalMark: null,
    timeColumn: null,
    rate: layout.rate,
    rateFrom: layout.rateFrom,
    startTime: layout.startTime,
    samples: layout.length,
    channels: layout.channels.map((c) => ({ position: c.position, name: c.name, unit: c.unit })),
    positionName: "variable",
    unsupported: layout.unsupported,
  };
}

/**
 * The MAT v5 format, told by its header's version field (0x0100, with the
 * endian indicator "IM" or "MI" after it).
 *
 * @example
 * ```ts
 * import { mat5Format } from "./mat5.ts";
 * const head = new Uint8Array(128);
 * head.set([0x01, 0x00, 0x4d, 0x49], 124); // big-endian: 0x0100, "MI"
 * if (!mat5Format.sniff(head) || mat5Format.sniff(new Uint8Array(64))) throw new Error();
 * ```
 */
export const mat5Format: RecordingFormat = {
  ...MAT5_HEAD,
  open: openMat5,
  describe: describeMat5,
};
