/**
 * Which datasets of an HDF5 file make a recording, and how
 * ({@linkcode Hdf5Layout}): the channels (each a dataset, or a column of a
 * 2-D one, with the dimension its samples run along), their common length,
 * the time dataset and where the sample rate comes from. Decided from the
 * file's tree (hdf5_file.ts) before a sample is read; HDF5 groups by
 * {@linkcode groupLayout}, MATLAB v7.3 files (mat73_layout.ts) by their own
 * rules into the same layout.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Hdf5Attribute, Hdf5Dataset, Hdf5Group } from "./hdf5_file.ts";

/** One channel: where its samples are. */
export interface Hdf5Channel {
  /** Name in the file. */
  readonly name: string;
  /** Unit in the file ("" when none). */
  readonly unit: string;
  /** The dataset that holds it. */
  readonly dataset: Hdf5Dataset;
  /** The dimension its samples run along (0, or 1 for a MATLAB column vector). */
  readonly axis: number;
  /** Its column of a 2-D dataset read along dimension 0; 0 otherwise. */
  readonly column: number;
}

/** A recording as an HDF5 file holds it. */
export interface Hdf5Layout {
  /** The group read ("/" for the root). */
  readonly group: string;
  /** The channels, in the file's order. */
  readonly channels: readonly Hdf5Channel[];
  /** Samples per channel. */
  readonly length: number;
  /** The time dataset (s), checked as it is read; null when there is none. */
  readonly time: { readonly dataset: Hdf5Dataset; readonly axis: number } | null;
  /** A rate stated in the file (an attribute or a scalar variable), Hz, and where; null when none. */
  readonly statedRate: { readonly hz: number; readonly from: string } | null;
  /** What the group holds that is not read, in words. */
  readonly notRead: readonly string[];
}

/** The names a time dataset goes by. */
export const HDF5_TIME_NAMES: ReadonlySet<string> = new Set(["time", "time_s"]);

/** Whether a dataset's type is one quiver reads as samples. */
export function isNumeric(d: Hdf5Dataset): boolean {
  return d.type !== "string" && d.type !== "other";
}

/** A text attribute, or undefined. */
function text(value: Hdf5Attribute | undefined): string | undefined {
  return typeof value === "string" ? value : undefined;
}

/** The unit of a dataset: its `unit` or `units` attribute ("" when none). */
function unitOf(attrs: Readonly<Record<string, Hdf5Attribute>>): string {
  return (text(attrs.unit) ?? text(attrs.units) ?? "").trim();
}

/** The parent path of a group or dataset path ("/" has none). */
function parentOf(path: string): string | undefined {
  if (path === "/") return undefined;
  const cut = path.lastIndexOf("/");
  return cut <= 0 ? "/" : path.slice(0, cut);
}

/** A rate attribute's value, checked: a positive finite number of Hz. */
function rateValue(value: Hdf5Attribute, where: string, file: string): number {
  if (typeof value !== "number" || !(value > 0) || !Number.isFinite(value)) {
    throw new QuiverError(
      `the sample_rate attribute of ${where} is ${
        JSON.stringify(value)
      }, not a positive number of Hz`,
      { file },
    );
  }
  return value;
}

/** A list of the datasets with their lengths: "acc (1000), mic (2000)". */
export function lengthsListed(items: readonly { name: string; length: number }[]): string {
  return items.map((i) => `${i.name} (${i.length})`).join(", ");
}

/**
 * The channels of one HDF5 group: each 1-D numeric dataset but the time
 * dataset (`time`, `time_s`), and each column of a 2-D numeric dataset of
 * samples × channels, named by its `channel_names` attribute (a list of
 * texts, one a column; `<dataset>_<k>` without it) and with units from
 * `unit`/`units` (one text for every column, or a list). The stated rate is
 * the `sample_rate` attribute (Hz) of the channels' datasets (they must
 * agree), else of the nearest group above them.
 *
 * @throws {QuiverError} (data) for datasets of different lengths (naming
 * them), a bad `sample_rate` or `channel_names` attribute, or a group with
 * no numeric dataset.
 *
 * @example
 * ```ts
 * import { groupLayout } from "./hdf5_layout.ts";
 * import type { Hdf5Group } from "./hdf5_file.ts";
 * const d = (name: string, attrs: Record<string, string> = {}) => ({ path: `/run/${name}`, name, shape: [100], type: "float64" as const, chunks: null, filters: [], attrs });
 * const groups: Hdf5Group[] = [
 *   { path: "/", attrs: { sample_rate: 1000 }, datasets: [], groups: ["/run"] },
 *   { path: "/run", attrs: {}, datasets: [d("acc", { unit: "g" }), d("time")], groups: [] },
 * ];
 * const l = groupLayout(groups, "/run", "r.h5");
 * if (l.channels.length !== 1 || l.channels[0].unit !== "g" || l.time === null || l.statedRate?.hz !== 1000) throw new Error();
 * ```
 */
export function groupLayout(groups: readonly Hdf5Group[], path: string, file: string): Hdf5Layout {
  const byPath = new Map(groups.map((g) => [g.path, g]));
  const group = byPath.get(path);
  if (group === undefined) throw new RangeError(`no group ${path}`);
  const channels: Hdf5Channel[] = [];
  const notRead: string[] = [];
  let time: Hdf5Dataset | null = null;
  const lengths: { name: string; length: number }[] = [];
  for (const d of group.datasets) {
    if (!isNumeric(d)) {
      notRead.push(`${d.path}: ${d.type === "string" ? "text" : "not a number type"}`);
      continue;
    }
    if (d.shape.length === 1 && HDF5_TIME_NAMES.has(d.name) && time === null) {
      time = d;
      lengths.push({ name: d.name, length: d.shape[0] });
      continue;
    }
    if (d.shape.length === 1) {
      channels.push({ name: d.name, unit: unitOf(d.attrs), dataset: d, axis: 0, column: 0 });
      lengths.push({ name: d.name, length: d.shape[0] });
    } else if (d.shape.length === 2) {
      const [rows, columns] = d.shape;
      const names = d.attrs.channel_names;
      const list = typeof names === "string" ? [names] : names;
      if (list !== undefined && (!Array.isArray(list) || list.length !== columns)) {
        throw new QuiverError(
          `dataset ${d.path} has ${columns} columns but its channel_names attribute ${
            Array.isArray(list) ? `names ${list.length}` : "is not a list of texts"
          }`,
          { file },
        );
      }
      const units = d.attrs.unit ?? d.attrs.units;
      const unitList = Array.isArray(units) && units.length === columns ? units : undefined;
      for (let k = 0; k < columns; k++) {
        channels.push({
          name: list === undefined ? `${d.name}_${k + 1}` : (list as readonly string[])[k],
          unit: (unitList?.[k] ?? text(units) ?? "").trim(),
          dataset: d,
          axis: 0,
          column: k,
        });
      }
      lengths.push({ name: d.name, length: rows });
    } else {
      notRead.push(`${d.path}: ${d.shape.length === 0 ? "a scalar" : `${d.shape.length}-D`}`);
    }
  }
  if (channels.length === 0) {
    throw new QuiverError(`group ${path} holds no 1-D or 2-D numeric dataset to read`, { file });
  }
  const length = lengths[0].length;
  if (lengths.some((l) => l.length !== length)) {
    throw new QuiverError(
      `group ${path} holds datasets of different lengths: ${
        lengthsListed(lengths)
      } samples; quiver reads datasets of one length as one recording`,
      { file },
    );
  }
  // The rate: the channels' datasets' attribute (one value), else the nearest group's.
  let statedRate: Hdf5Layout["statedRate"] = null;
  for (const c of channels) {
    const a = c.dataset.attrs.sample_rate;
    if (a === undefined) continue;
    const hz = rateValue(a, `dataset ${c.dataset.path}`, file);
    if (statedRate !== null && statedRate.hz !== hz) {
      throw new QuiverError(
        `the datasets of group ${path} state different sample rates: ${statedRate.hz} Hz (${statedRate.from}) and ${hz} Hz (dataset ${c.dataset.path})`,
        { file },
      );
    }
    statedRate ??= { hz, from: `the sample_rate attribute of dataset ${c.dataset.path}` };
  }
  for (let at: string | undefined = path; statedRate === null && at !== undefined;) {
    const a = byPath.get(at)?.attrs.sample_rate;
    if (a !== undefined) {
      statedRate = {
        hz: rateValue(a, `group ${at}`, file),
        from: `the sample_rate attribute of group ${at}`,
      };
    }
    at = parentOf(at);
  }
  return {
    group: path,
    channels,
    length,
    time: time === null ? null : { dataset: time, axis: 0 },
    statedRate,
    notRead,
  };
}

/** A group path as `--group` may give it ("run1", "/run1/"), as the file names it ("/run1"). */
export function normalGroupPath(name: string): string {
  const trimmed = name.trim().replace(/\/+$/, "");
  return trimmed.startsWith("/") ? trimmed || "/" : `/${trimmed}`;
}

/** The groups of a file that hold a 1-D or 2-D numeric dataset, by path. */
export function groupsWithData(groups: readonly Hdf5Group[]): Hdf5Group[] {
  return groups.filter((g) =>
    g.datasets.some((d) =>
      isNumeric(d) &&
      (d.shape.length === 2 || (d.shape.length === 1 && !HDF5_TIME_NAMES.has(d.name)))
    )
  );
}

/**
 * The group to read: the one `--group` names, else the only group that holds
 * numeric datasets. `describe` says a group's channels, rate and length for
 * the list in a message (default: nothing).
 *
 * @throws {QuiverError} (usage) for a named group the file does not hold, or
 * none named in a file with several, listing the groups that hold data.
 *
 * @example
 * ```ts
 * import { chooseGroup } from "./hdf5_layout.ts";
 * const g = (path: string) => ({ path, attrs: {}, datasets: [{ path: `${path}/a`, name: "a", shape: [4], type: "int16" as const, chunks: null, filters: [], attrs: {} }], groups: [] });
 * if (chooseGroup([g("/x")], undefined, "r.h5") !== "/x" || chooseGroup([g("/x"), g("/y")], "y/", "r.h5") !== "/y") throw new Error();
 * ```
 */
export function chooseGroup(
  groups: readonly Hdf5Group[],
  named: string | undefined,
  file: string,
  describe: (path: string) => string = () => "",
): string {
  const withData = groupsWithData(groups).map((g) => g.path);
  const listed = withData.length === 0
    ? "none"
    : withData.map((p) => `${p}${describe(p) === "" ? "" : ` (${describe(p)})`}`).join(", ");
  if (named !== undefined) {
    const path = normalGroupPath(named);
    if (!groups.some((g) => g.path === path)) {
      throw new QuiverError(
        `the file holds no group ${path}; groups with datasets: ${listed}`,
        { file },
        "usage",
      );
    }
    return path;
  }
  if (withData.length === 1) return withData[0];
  throw new QuiverError(
    withData.length === 0
      ? "the file holds no group with a 1-D or 2-D numeric dataset"
      : `the file holds several groups with datasets: ${listed}; name one with --group`,
    { file },
    withData.length === 0 ? "data" : "usage",
  );
}
