/**
 * HDF5 recordings, read through npm `h5wasm` (hdf5_file.ts): one group's
 * 1-D numeric datasets (and 2-D samples × channels ones) are the channels
 * (hdf5_layout.ts), read by hyperslab chunk by chunk (hdf5_stream.ts), never
 * whole. The group is `--group`, else the only one that holds datasets.
 *
 * @module
 */
import { QuiverError } from "../../errors.ts";
import { Hdf5File, type Hdf5Group } from "../hdf5_file.ts";
import {
  chooseGroup,
  groupLayout,
  groupsWithData,
  type Hdf5Layout,
  isNumeric,
} from "../hdf5_layout.ts";
import { hdf5Stream, hdf5Timing } from "../hdf5_stream.ts";
import type { RecordingStream } from "../recording_source.ts";
import {
  channelTransforms,
  type DescribedGroup,
  type FormatOptions,
  type RecordingDescription,
  type RecordingFormat,
} from "./format.ts";
import { HDF5_HEAD } from "./signatures.ts";

/** Refuses the options of text formats that do not apply to a binary file. */
export function refuseTextOptions(options: FormatOptions, label: string, path: string): void {
  if (options.timeColumn !== undefined) {
    throw new QuiverError(
      `a ${label} file has no time column; do not name one (--time-column)`,
      { file: path },
      "usage",
    );
  }
}

/** The layout of the group to read, its file open (the caller closes it). */
function layoutOf(file: Hdf5File, groups: readonly Hdf5Group[], options: FormatOptions) {
  const group = chooseGroup(groups, options.group, file.path, (path) => {
    const g = describedGroups(file, groups).find((d) => d.name === path);
    if (g === undefined || g.samples === null) return "";
    const rate = g.rate === null ? "rate unknown" : `${g.rate} Hz`;
    return `${g.channels.length} channels, ${rate}, ${g.samples} samples`;
  });
  return groupLayout(groups, group, file.path);
}

/**
 * A layout opened as a stream with the set-up applied: the shared end of the
 * HDF5 and MAT v7.3 formats.
 */
export async function openLayout(
  file: Hdf5File,
  layout: Hdf5Layout,
  options: FormatOptions,
): Promise<RecordingStream> {
  const timing = hdf5Timing(file, layout, { rate: options.rate, required: true });
  const transforms = await channelTransforms(
    layout.channels.map((c) => ({ name: c.name, unit: c.unit })),
    options,
  );
  return hdf5Stream(
    file.path,
    layout,
    { rate: timing.rate as number, startTime: timing.startTime },
    transforms,
    options,
  );
}

async function openHdf5(path: string, options: FormatOptions): Promise<RecordingStream> {
  refuseTextOptions(options, "HDF5", path);
  const file = await Hdf5File.open(path);
  try {
    return await openLayout(file, layoutOf(file, file.groups(), options), options);
  } finally {
    file.close();
  }
}

/** A layout described for `quiver info` (no sample read; a time dataset's ends only). */
export function describeLayout(
  file: Hdf5File,
  layout: Hdf5Layout,
  options: { rate?: number },
): RecordingDescription {
  const timing = hdf5Timing(file, layout, { rate: options.rate, required: false });
  return {
    delimiter: null,
    decimalMark: null,
    timeColumn: null,
    rate: timing.rate,
    rateFrom: timing.rateFrom,
    startTime: timing.startTime,
    samples: layout.length,
    channels: layout.channels.map((c, i) => ({ position: i + 1, name: c.name, unit: c.unit })),
    positionName: "channel",
    ...(layout.notRead.length > 0 ? { unsupported: layout.notRead } : {}),
  };
}

/** Every group that holds datasets, with its length and rate where they can be told. */
function describedGroups(file: Hdf5File, groups: readonly Hdf5Group[]): DescribedGroup[] {
  return groupsWithData(groups).map((g) => {
    try {
      const layout = groupLayout(groups, g.path, file.path);
      const timing = hdf5Timing(file, layout, { required: false });
      return {
        name: g.path,
        samples: layout.length,
        rate: timing.rate,
        channels: layout.channels.map((c, i) => ({ position: i + 1, name: c.name, unit: c.unit })),
      };
    } catch (error) {
      if (!(error instanceof QuiverError)) throw error;
      // Mixed lengths or a bad attribute: listed without length or rate (reading it says why).
      const datasets = g.datasets.filter((d) => isNumeric(d) && d.shape.length === 1);
      return {
        name: g.path,
        samples: null,
        rate: null,
        channels: datasets.map((d, i) => ({ position: i + 1, name: d.name, unit: "" })),
      };
    }
  });
}

async function describeHdf5(
  path: string,
  options: Omit<FormatOptions, "setup">,
): Promise<RecordingDescription> {
  refuseTextOptions(options, "HDF5", path);
  const file = await Hdf5File.open(path);
  try {
    const groups = file.groups();
    const described = describeLayout(file, layoutOf(file, groups, options), options);
    return { ...described, groups: describedGroups(file, groups) };
  } finally {
    file.close();
  }
}

/**
 * The HDF5 format, told by its signature (at byte 0, or after a user block);
 * a MATLAB v7.3 file is left to its own format (mat73.ts).
 *
 * @example
 * ```ts
 * import { hdf5Format } from "./hdf5.ts";
 * const head = new Uint8Array([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0]);
 * if (!hdf5Format.sniff(head) || hdf5Format.sniff(new TextEncoder().encode("time_s,a\n"))) throw new Error();
 * ```
 */
export const hdf5Format: RecordingFormat = {
  ...HDF5_HEAD,
  open: openHdf5,
  describe: describeHdf5,
};
