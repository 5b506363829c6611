/**
 * What each binary recording format is called and how its first bytes tell
 * it ({@linkcode FormatHead}), apart from the code that reads it. mod.ts
 * sniffs a file with these alone and loads a format's reading code on its
 * first file of that format, so that `quiver spectrum x.csv` does not load
 * the HDF5, MAT and MDF 4 readers (about 20 modules) before it reads a byte.
 * The tests below these heads are small modules of their own (no reading
 * code behind them).
 *
 * @module
 */
import { isMat73Header } from "../hdf5_mat73.ts";
import { mat5Endian } from "../mat5_elements.ts";
import { looksLikeMdf4 } from "../mdf4_blocks.ts";
import { looksLikeWav } from "../wav.ts";
import type { RecordingFormat } from "./format.ts";

/**
 * A format's name, label, kind, signature test and whether it opens again
 * for a worker: its `RecordingFormat` without the reading.
 */
export type FormatHead = Pick<RecordingFormat, "name" | "label" | "kind" | "sniff" | "opensAgain">;

/** HDF5's format signature. */
const HDF5_SIGNATURE = [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a];

/**
 * Whether `head` shows HDF5's signature where the library looks for it: at
 * byte 0 or after a user block of 512, 1024 or 2048 bytes.
 *
 * @example
 * ```ts
 * import { hasHdf5Signature } from "./signatures.ts";
 * const head = new Uint8Array(600);
 * head.set([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a], 512);
 * if (!hasHdf5Signature(head) || hasHdf5Signature(head.subarray(0, 519))) throw new Error();
 * ```
 */
export function hasHdf5Signature(head: Uint8Array): boolean {
  return [0, 512, 1024, 2048].some((at) =>
    head.length >= at + 8 && HDF5_SIGNATURE.every((b, i) => head[at + i] === b)
  );
}

/** WAV (RIFF/WAVE, RF64, BW64); formats/wav.ts builds its format on it. */
export const WAV_HEAD: FormatHead = {
  name: "wav",
  label: "WAV",
  kind: "binary",
  // Measured: 4 × 2^24 samples, a worker decoding its own channels about 1.05× the ring.
  opensAgain: true,
  sniff: looksLikeWav,
};

/** MAT v5: version and endian indicator at bytes 124–127. */
export const MAT5_HEAD: FormatHead = {
  name: "mat5",
  label: "MAT v5",
  kind: "binary",
  sniff: (head) => mat5Endian(head) !== undefined,
};

/**
 * HDF5, told by its signature (at byte 0, or after a user block); a MATLAB
 * v7.3 file is left to its own format.
 */
export const HDF5_HEAD: FormatHead = {
  name: "hdf5",
  label: "HDF5",
  kind: "binary",
  sniff: (head) => hasHdf5Signature(head) && !isMat73Header(head),
};

/** MAT v7.3: its user block's header text and the HDF5 signature at byte 512. */
export const MAT73_HEAD: FormatHead = {
  name: "mat73",
  label: "MAT v7.3",
  kind: "binary",
  sniff: isMat73Header,
};

/** ASAM MDF 4: the identification block's "MDF     4.". */
export const MDF4_HEAD: FormatHead = {
  name: "mdf4",
  label: "MDF 4",
  kind: "binary",
  sniff: looksLikeMdf4,
};
