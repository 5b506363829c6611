/**
 * MATLAB v7.3 MAT-files: HDF5 behind a 512-byte user block whose text says
 * "MATLAB 7.3 MAT-file", read through the same HDF5 reader (hdf5_file.ts,
 * hdf5_stream.ts). The numeric vectors at the root are the channels
 * (hdf5_mat73.ts); a file holds one recording, so `--group` is refused.
 *
 * @module
 */
import { Hdf5File } from "../hdf5_file.ts";
import { matLayout } from "../hdf5_mat73.ts";
import type { RecordingStream } from "../recording_source.ts";
import { describeLayout, openLayout, refuseTextOptions } from "./hdf5.ts";
import {
  type FormatOptions,
  type RecordingDescription,
  type RecordingFormat,
  refuseGroup,
} from "./format.ts";
import { MAT73_HEAD } from "./signatures.ts";

/** The layout of a MAT-file, its scalars read from the open file. */
function layoutOf(file: Hdf5File) {
  return matLayout(file.groups(), (d) => {
    const out = new Float64Array(1);
    file.readRows(d, 0, 1, out);
    return out[0];
  }, file.path);
}

async function openMat73(path: string, options: FormatOptions): Promise<RecordingStream> {
  refuseGroup(options, "MAT v7.3", path);
  refuseTextOptions(options, "MAT v7.3", path);
  const file = await Hdf5File.open(path);
  try {
    return await openLayout(file, layoutOf(file), options);
  } finally {
    file.close();
  }
}

async function describeMat73(
  path: string,
  options: Omit<FormatOptions, "setup">,
): Promise<RecordingDescription> {
  refuseGroup(options, "MAT v7.3", path);
  refuseTextOptions(options, "MAT v7.3", path);
  const file = await Hdf5File.open(path);
  try {
    return describeLayout(file, layoutOf(file), options);
  } finally {
    file.close();
  }
}

/**
 * The MAT v7.3 format, told by its user block's header text and the HDF5
 * signature at byte 512.
 *
 * @example
 * ```ts
 * import { mat73Format } from "./mat73.ts";
 * const head = new Uint8Array(600);
 * head.set(new TextEncoder().encode("MATLAB 7.3 MAT-file, Platform: GLNXA64"));
 * head.set([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a], 512);
 * if (!mat73Format.sniff(head) || mat73Format.name !== "mat73") throw new Error();
 * ```
 */
export const mat73Format: RecordingFormat = {
  ...MAT73_HEAD,
  open: openMat73,
  describe: describeMat73,
};
