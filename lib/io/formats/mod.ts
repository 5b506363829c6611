/**
 * The recording formats quiver reads: ONE list ({@linkcode RECORDING_FORMATS}),
 * which the reader's sniffing and its message for a file of no known format
 * use. A new format is one file in this folder and one entry here. A binary
 * format's entry is its head (signatures.ts) and its file, loaded when a file
 * of that format is first opened or described: every start-up reads CSV's
 * code (the format files no signature claims fall to), no other reader's.
 *
 * @module
 */
import { open } from "node:fs/promises";
import { QuiverError } from "../../errors.ts";
import { NotUtf8Error } from "../csv_scanner.ts";
import { assertRegularFile, unreadable } from "../file_kinds.ts";
import { csvFormat } from "./csv.ts";
import { type RecordingFormat, SNIFF_BYTES } from "./format.ts";
import { lazyImport } from "../../lazy_import.ts";
import {
  type FormatHead,
  HDF5_HEAD,
  MAT5_HEAD,
  MAT73_HEAD,
  MDF4_HEAD,
  WAV_HEAD,
} from "./signatures.ts";

export type {
  DescribedChannel,
  FormatOptions,
  ReadRecordingOptions,
  RecordingDescription,
  RecordingFormat,
} from "./format.ts";

/**
 * The format of `head`, its `open` and `describe` those of the format that
 * `load` gives, loaded on the first call (lazyImport: not at start-up).
 *
 * @throws {Error} (internal) when the loaded format is not the one `head` names.
 */
function loadedWhenUsed(head: FormatHead, load: () => Promise<RecordingFormat>): RecordingFormat {
  let loaded: Promise<RecordingFormat> | undefined;
  const format = () =>
    loaded ??= load().then((f) => {
      if (
        f.name !== head.name || f.label !== head.label || f.kind !== head.kind ||
        f.opensAgain !== head.opensAgain
      ) {
        throw new Error(`format ${head.name} loaded as ${f.name} (${f.label}, ${f.kind})`);
      }
      return f;
    });
  return {
    ...head,
    open: async (path, options) => (await format()).open(path, options),
    describe: async (path, options) => (await format()).describe(path, options),
  };
}

/**
 * Every format quiver reads, in the order messages name them. A file is
 * tried against the binary formats first (in this order), then the text
 * ones.
 */
export const RECORDING_FORMATS: readonly RecordingFormat[] = [
  csvFormat,
  loadedWhenUsed(
    WAV_HEAD,
    async () =>
      (await lazyImport<typeof import("./wav.ts")>("./wav.ts", import.meta.url)).wavFormat,
  ),
  loadedWhenUsed(
    MAT5_HEAD,
    async () =>
      (await lazyImport<typeof import("./mat5.ts")>("./mat5.ts", import.meta.url)).mat5Format,
  ),
  loadedWhenUsed(
    HDF5_HEAD,
    async () =>
      (await lazyImport<typeof import("./hdf5.ts")>("./hdf5.ts", import.meta.url)).hdf5Format,
  ),
  loadedWhenUsed(
    MAT73_HEAD,
    async () =>
      (await lazyImport<typeof import("./mat73.ts")>("./mat73.ts", import.meta.url)).mat73Format,
  ),
  loadedWhenUsed(
    MDF4_HEAD,
    async () =>
      (await lazyImport<typeof import("./mdf4.ts")>("./mdf4.ts", import.meta.url)).mdf4Format,
  ),
];

/**
 * The format of a file whose first bytes are `head`: the first binary
 * format whose signature they show, else the first text format that takes
 * them; undefined when none does.
 *
 * @example
 * ```ts
 * import { formatOf } from "./mod.ts";
 * if (formatOf(new TextEncoder().encode("time_s,a\n0,1\n"))?.name !== "csv") throw new Error();
 * if (formatOf(new TextEncoder().encode("RIFF\0\0\0\0WAVEfmt "))?.name !== "wav") throw new Error();
 * ```
 */
export function formatOf(head: Uint8Array): RecordingFormat | undefined {
  return RECORDING_FORMATS.find((f) => f.kind === "binary" && f.sniff(head)) ??
    RECORDING_FORMATS.find((f) => f.kind === "text" && f.sniff(head));
}

/** "a", "a and b", "a, b and c" (with `last` for "and"). */
function listed(words: readonly string[], last: string): string {
  return words.length <= 1
    ? words.join("")
    : `${words.slice(0, -1).join(", ")} ${last} ${words[words.length - 1]}`;
}

/**
 * The formats quiver reads, for help texts: "CSV, WAV or MAT v5".
 *
 * @example
 * ```ts
 * import { RECORDING_FORMAT_NAMES } from "./mod.ts";
 * if (!RECORDING_FORMAT_NAMES.startsWith("CSV, WAV")) throw new Error(RECORDING_FORMAT_NAMES);
 * ```
 */
export const RECORDING_FORMAT_NAMES: string = listed(RECORDING_FORMATS.map((f) => f.label), "or");

/**
 * The error for a file of no format quiver reads, naming them all; `advice`
 * (what to do about it) ends it in brackets.
 *
 * @example
 * ```ts
 * import { notRecognised } from "./mod.ts";
 * const e = notRecognised("x.bin");
 * if (e.message !== "x.bin: neither a WAV, MAT v5, HDF5, MAT v7.3 or MDF 4 file nor UTF-8 text; quiver reads CSV, WAV, MAT v5, HDF5, MAT v7.3 and MDF 4 recordings") throw new Error(e.message);
 * ```
 */
export function notRecognised(file?: string, advice?: string): QuiverError {
  const binary = RECORDING_FORMATS.filter((f) => f.kind === "binary").map((f) => f.label);
  const kinds = [
    ...(binary.length > 0 ? [`a ${listed(binary, "or")} file`] : []),
    ...(RECORDING_FORMATS.some((f) => f.kind === "text") ? ["UTF-8 text"] : []),
  ];
  const what = kinds.length === 1 ? `not ${kinds[0]}` : `neither ${kinds[0]} nor ${kinds[1]}`;
  const all = listed(RECORDING_FORMATS.map((f) => f.label), "and");
  const why = advice === undefined ? "" : ` (${advice})`;
  return new QuiverError(`${what}; quiver reads ${all} recordings${why}`, { file });
}

/** `work`, with bytes that a text format finds not to be UTF-8 answered by {@linkcode notRecognised}. */
async function recognised<T>(work: Promise<T>): Promise<T> {
  try {
    return await work;
  } catch (error) {
    if (error instanceof NotUtf8Error) {
      throw notRecognised(error.location.file, error.advice);
    }
    throw error;
  }
}

/**
 * The format of the recording at `path`, told by its first bytes, as the
 * reader uses it: its `open` and `describe` answer a file of no known format
 * with {@linkcode notRecognised}.
 *
 * @throws {QuiverError} (usage) for a path that is not a regular file or
 * cannot be read; {@linkcode notRecognised} when no format takes the file.
 *
 * @example
 * ```ts
 * import { sniffRecording } from "./mod.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/r.csv`, new Uint8Array([0x61, 0x0a, 0xe9, 0x0a]));
 * const format = await sniffRecording(`${dir}/r.csv`);
 * let message = "";
 * try { await format.open(`${dir}/r.csv`, {}); } catch (e) { message = (e as Error).message; }
 * if (format.name !== "csv" || !message.includes(": neither a WAV, MAT v5, HDF5, MAT v7.3 or MDF 4 file nor UTF-8 text; quiver reads CSV, WAV, MAT v5, HDF5, MAT v7.3 and MDF 4 recordings (")) throw new Error(message);
 * ```
 */
export async function sniffRecording(path: string): Promise<RecordingFormat> {
  assertRegularFile(path, "recording");
  let head: Uint8Array;
  try {
    const h = await open(path, "r");
    try {
      const buffer = new Uint8Array(SNIFF_BYTES);
      const { bytesRead } = await h.read(buffer, 0, SNIFF_BYTES, 0);
      head = buffer.subarray(0, bytesRead);
    } finally {
      await h.close();
    }
  } catch (error) {
    throw unreadable(path, error);
  }
  const format = formatOf(head);
  if (format === undefined) throw notRecognised(path);
  return {
    ...format,
    open: (file, options) => recognised(format.open(file, options)),
    describe: (file, options) => recognised(format.describe(file, options)),
  };
}
