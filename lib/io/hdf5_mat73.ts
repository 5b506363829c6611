/**
 * Which variables of a MATLAB v7.3 MAT-file (an HDF5 file behind a 512-byte
 * user block) make a recording: {@linkcode matLayout}. MATLAB stores each
 * variable at the root as a dataset with a `MATLAB_class` attribute, its
 * dimensions reversed (column-major): a 1×N row vector as an N×1 dataset,
 * an N×1 column vector as 1×N, a scalar as 1×1 (as documented of the format
 * and known from MATLAB's files: from memory).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Hdf5Dataset, Hdf5Group } from "./hdf5_file.ts";
import { type Hdf5Channel, type Hdf5Layout, lengthsListed } from "./hdf5_layout.ts";

/** The MATLAB classes read as numbers. */
const NUMERIC_CLASSES: ReadonlySet<string> = new Set([
  "double",
  "single",
  "int8",
  "int16",
  "int32",
  "int64",
  "uint8",
  "uint16",
  "uint32",
  "uint64",
]);

/** Names of a scalar variable that gives the sample rate, Hz. */
export const MAT_RATE_NAMES: readonly string[] = ["sample_rate", "fs"];

/** Names of a time vector, s. */
export const MAT_TIME_NAMES: ReadonlySet<string> = new Set(["t", "time"]);

/** A variable's MATLAB size as MATLAB writes it ("3×1000") from the dataset's reversed shape. */
function matlabSize(d: Hdf5Dataset): string {
  return [...d.shape].reverse().join("×");
}

/**
 * The header text a MATLAB v7.3 file's user block starts with.
 *
 * @example
 * ```ts
 * import { isMat73Header } from "./hdf5_mat73.ts";
 * const head = new Uint8Array(1024);
 * head.set(new TextEncoder().encode("MATLAB 7.3 MAT-file, Platform: GLNXA64"));
 * head.set([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a], 512);
 * if (!isMat73Header(head)) throw new Error();
 * ```
 */
export function isMat73Header(head: Uint8Array): boolean {
  const text = new TextDecoder("latin1").decode(head.subarray(0, 19));
  return text === "MATLAB 7.3 MAT-file" && head.length >= 520 &&
    [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a].every((b, i) => head[512 + i] === b);
}

/**
 * The recording of a MAT v7.3 file: every numeric vector at the root but the
 * time vector (`t`, `time`) is a channel, in either orientation; the rate
 * from a scalar `sample_rate` or `fs` (read through `scalar`). Text, logical
 * values, cells, structs, complex numbers, matrices and other scalars are
 * listed as not read.
 *
 * @throws {QuiverError} (data) for vectors of different lengths (naming
 * them), rate variables that disagree or are not positive, or no numeric
 * vector.
 *
 * @example
 * ```ts
 * import { matLayout } from "./hdf5_mat73.ts";
 * const v = (name: string, shape: number[], cls = "double") => ({ path: `/${name}`, name, shape, type: "float64" as const, chunks: null, filters: [], attrs: { MATLAB_class: cls } });
 * const root = { path: "/", attrs: {}, datasets: [v("a", [1, 50]), v("b", [50, 1]), v("fs", [1, 1]), v("s", [5, 1], "char")], groups: [] };
 * const l = matLayout([root], () => 200, "r.mat");
 * if (l.channels.length !== 2 || l.channels[0].axis !== 1 || l.statedRate?.hz !== 200 || l.notRead.length !== 1) throw new Error();
 * ```
 */
export function matLayout(
  groups: readonly Hdf5Group[],
  scalar: (dataset: Hdf5Dataset) => number,
  file: string,
): Hdf5Layout {
  const root = groups.find((g) => g.path === "/");
  if (root === undefined) throw new RangeError("no root group");
  const notRead: string[] = [];
  const channels: Hdf5Channel[] = [];
  let time: Hdf5Layout["time"] = null;
  let statedRate: Hdf5Layout["statedRate"] = null;
  const lengths: { name: string; length: number }[] = [];
  for (const d of root.datasets) {
    const cls = d.attrs.MATLAB_class;
    const empty = d.attrs.MATLAB_empty;
    if (typeof cls !== "string") {
      notRead.push(`${d.name}: no MATLAB_class attribute`);
      continue;
    }
    if (empty !== undefined && empty !== null && empty !== 0) {
      notRead.push(`${d.name}: empty ${cls}`);
      continue;
    }
    if (!NUMERIC_CLASSES.has(cls)) {
      const what = cls === "char"
        ? "text (char)"
        : cls === "logical"
        ? "logical values"
        : cls === "cell"
        ? "a cell array"
        : `a ${cls}`;
      notRead.push(`${d.name}: ${what}`);
      continue;
    }
    if (d.type === "other" || d.type === "string") {
      notRead.push(`${d.name}: complex ${cls}`);
      continue;
    }
    if (d.shape.length !== 2) {
      notRead.push(`${d.name}: a ${d.shape.length}-D ${cls} array`);
      continue;
    }
    const [a, b] = d.shape;
    if (a === 1 && b === 1) {
      if (MAT_RATE_NAMES.includes(d.name)) {
        const hz = scalar(d);
        if (!(hz > 0) || !Number.isFinite(hz)) {
          throw new QuiverError(`variable ${d.name} is ${hz}, not a positive number of Hz`, {
            file,
          });
        }
        if (statedRate !== null && statedRate.hz !== hz) {
          throw new QuiverError(
            `${statedRate.from} says ${statedRate.hz} Hz but the variable ${d.name} ${hz} Hz`,
            { file },
          );
        }
        statedRate ??= { hz, from: `the variable ${d.name}` };
      } else notRead.push(`${d.name}: a scalar`);
      continue;
    }
    if (a !== 1 && b !== 1) {
      notRead.push(`${d.name}: a ${matlabSize(d)} matrix, not a vector`);
      continue;
    }
    // A 1×N dataset is MATLAB's N×1 column vector: its samples run along dimension 1.
    const axis = a === 1 ? 1 : 0;
    const length = d.shape[axis];
    lengths.push({ name: d.name, length });
    if (MAT_TIME_NAMES.has(d.name) && time === null) {
      time = { dataset: d, axis };
      continue;
    }
    channels.push({ name: d.name, unit: "", dataset: d, axis, column: 0 });
  }
  for (const path of root.groups) {
    const g = groups.find((x) => x.path === path);
    const cls = g?.attrs.MATLAB_class;
    notRead.push(`${path.slice(1)}: ${typeof cls === "string" ? `a ${cls}` : "a group"}`);
  }
  if (channels.length === 0) {
    throw new QuiverError("the MAT-file holds no numeric vector to read as a channel", { file });
  }
  const length = lengths[0].length;
  if (lengths.some((l) => l.length !== length)) {
    throw new QuiverError(
      `the MAT-file's vectors have different lengths: ${
        lengthsListed(lengths)
      } samples; quiver reads vectors of one length as one recording`,
      { file },
    );
  }
  return { group: "/", channels, length, time, statedRate, notRead };
}
