/**
 * What a recording file format is to quiver ({@linkcode RecordingFormat}):
 * a name, a test of a file's first bytes, a way to open the file as a
 * {@linkcode RecordingStream} with the channel set-up applied, and what
 * `quiver info` shows of it without reading its samples. Each format is one
 * file in this folder and one entry of the list in mod.ts; slicing and
 * collecting are written once above the formats (recording_source.ts).
 *
 * @module
 */
import { QuiverError } from "../../errors.ts";
import { type ChannelTransform, setupTransforms } from "../channel_transforms.ts";
import { lazyImport } from "../../lazy_import.ts";
import type { CsvDelimiter } from "../csv_dialect.ts";
import type { CsvReadOptions } from "../csv_recording.ts";
import type { DecimalMark } from "../numbers.ts";
import type { RecordingStream } from "../recording_source.ts";

/** Options of reading a recording file (every format; each refuses those that do not apply). */
export interface ReadRecordingOptions extends Omit<CsvReadOptions, "file"> {
  /** Path of a channel set-up JSON file. Default: none. */
  setup?: string;
  /** Start of the stretch to read, s on the recording's own time axis. Default: its start. */
  start?: number;
  /** End of the stretch to read (exclusive), s. Default: its end. */
  end?: number;
  /**
   * The group to read, in a format that holds several recordings in one file
   * (an HDF5 group's path, an MDF 4 channel group's name or index). Formats
   * without groups refuse it. Default: the file's only group.
   */
  group?: string;
}

/** What a format's `open` is given: the reading options but the time slice, applied above it. */
export type FormatOptions = Omit<ReadRecordingOptions, "start" | "end">;

/** One channel as the file holds it, for `quiver info`. */
export interface DescribedChannel {
  /** 1-based place in the file (CSV column, WAV channel). */
  readonly position: number;
  /** Name in the file. */
  readonly name: string;
  /** Unit in the file ("" when none). */
  readonly unit: string;
}

/** One group of a file that holds several recordings, for `quiver info`. */
export interface DescribedGroup {
  /** How `--group` names it (a path, a name or an index). */
  readonly name: string;
  /** Samples per channel; null when only reading the samples would tell. */
  readonly samples: number | null;
  /** Sample rate, Hz; null when unknown. */
  readonly rate: number | null;
  /** Its channels as the file holds them. */
  readonly channels: readonly DescribedChannel[];
}

/**
 * What `quiver info` shows of a recording, found without reading its
 * samples. The text layout (delimiter, decimal mark, time column) is null
 * for a format that is not text.
 */
export interface RecordingDescription {
  /** The delimiter in use and where it comes from; null for a format that is not text. */
  readonly delimiter: { readonly char: CsvDelimiter; readonly from: string } | null;
  /** The decimal mark and where it comes from; null when none is seen or not text. */
  readonly decimalMark: { readonly char: DecimalMark; readonly from: string } | null;
  /** The time column: name, unit and 1-based column; null when there is none. */
  readonly timeColumn:
    | { readonly name: string; readonly unit: string; readonly column: number }
    | null;
  /** Sample rate, Hz; null when unknown (a CSV without time column or `rate`). */
  readonly rate: number | null;
  /** Where the rate comes from, in words; null with the rate. */
  readonly rateFrom: string | null;
  /** Time of the first sample, s; null when unknown. */
  readonly startTime: number | null;
  /** Samples per channel. */
  readonly samples: number;
  /** The channels as the file holds them, before any set-up. */
  readonly channels: readonly DescribedChannel[];
  /** What a channel's place is called in `quiver info`'s text: "column", "channel". */
  readonly positionName: string;
  /**
   * The container, for a format that has several and a file not in the
   * usual one (a WAV file's "RF64" or "BW64"); absent otherwise.
   */
  readonly container?: string;
  /**
   * Every group of a file that holds several, the one described above among
   * them; absent for a format without groups.
   */
  readonly groups?: readonly DescribedGroup[];
  /**
   * What the file holds that quiver does not read, in words (a bus-frame
   * channel group, a conversion it lacks), so that `quiver info` lists it
   * rather than hiding it; absent or empty when there is none.
   */
  readonly unsupported?: readonly string[];
}

/** A recording file format. */
export interface RecordingFormat {
  /** Short name, lower case, as `quiver info --json` prints it: "csv", "wav". */
  readonly name: string;
  /** The name in messages: "CSV", "WAV". */
  readonly label: string;
  /**
   * `"binary"`: told by a signature in its first bytes; `"text"`: UTF-8
   * text, tried after every binary format. Messages say "a WAV file" of a
   * binary format and "UTF-8 text" of a text one.
   */
  readonly kind: "binary" | "text";
  /**
   * Whether another thread may open the file again to read some of its
   * channels itself (a spectral worker, lib/dsp/spectral_pipeline.ts): true
   * only where opening again costs little and a subset of channels is
   * cheaper to read than all of them, as measured (WAV). Default: false.
   */
  readonly opensAgain?: boolean;
  /**
   * Whether a file whose first bytes are `head` is of this format. `head`
   * holds the first {@linkcode SNIFF_BYTES} bytes, or the whole file when
   * it is shorter.
   */
  sniff(head: Uint8Array): boolean;
  /**
   * Opens the file for chunked reading with the set-up applied: the header
   * is read (and checked) now, the samples by the stream's `read`.
   *
   * @throws {QuiverError} for a bad header, a bad set-up, or an option that
   * does not apply to the format.
   */
  open(path: string, options: FormatOptions): Promise<RecordingStream>;
  /**
   * What `quiver info` shows, without reading the samples. `options` carry
   * no set-up: the command applies it to the channels described.
   *
   * @throws {QuiverError} as `open` does for the header.
   */
  describe(path: string, options: Omit<FormatOptions, "setup">): Promise<RecordingDescription>;
}

/**
 * Refuses `--group` for a format whose files hold one recording.
 *
 * @throws {QuiverError} (usage) when `options.group` is given.
 *
 * @example
 * ```ts
 * import { refuseGroup } from "./format.ts";
 * refuseGroup({}, "WAV", "r.wav");
 * let refused = false;
 * try { refuseGroup({ group: "1" }, "WAV", "r.wav"); } catch { refused = true; }
 * if (!refused) throw new Error();
 * ```
 */
export function refuseGroup(options: { group?: string }, label: string, path: string): void {
  if (options.group !== undefined) {
    throw new QuiverError(
      `a ${label} file holds one recording; do not name a group (--group)`,
      { file: path },
      "usage",
    );
  }
}

/**
 * Bytes read from a file's start for {@linkcode RecordingFormat.sniff}:
 * enough for a signature 512 bytes in (an HDF5 file after a user block, as
 * MATLAB v7.3 writes).
 */
export const SNIFF_BYTES = 4096;

/**
 * The transforms of the channels found in a file's header (names and units
 * as the file holds them): the set-up file's when `options.setup` names one,
 * else only the conversion to SI base units (units.ts).
 *
 * @throws {QuiverError} for a set-up file that cannot be read, is invalid,
 * or does not fit the channels.
 *
 * @example
 * ```ts
 * import { channelTransforms } from "./format.ts";
 * const [t] = await channelTransforms([{ name: "acc", unit: "g" }], {});
 * if (t.unit !== "m/s^2" || t.factor !== 9.80665) throw new Error();
 * ```
 */
export async function channelTransforms(
  channels: { name: string; unit: string }[],
  options: FormatOptions,
): Promise<ChannelTransform[]> {
  if (options.setup === undefined) return setupTransforms(channels, { channels: {} });
  // The set-up file's schema (zod) is loaded only for a reading that has one.
  const { readChannelSetup } = await lazyImport<typeof import("../channel_setup.ts")>(
    "../channel_setup.ts",
    import.meta.url,
  );
  return setupTransforms(channels, await readChannelSetup(options.setup), options.setup);
}
