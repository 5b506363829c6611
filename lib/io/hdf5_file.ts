/**
 * An HDF5 file opened for reading through npm `h5wasm` (the HDF5 C library
 * compiled to WebAssembly; its node build reaches the host file system
 * directly, by positioned reads, so a file is never loaded whole):
 * {@linkcode Hdf5File} lists the groups and datasets with their shapes,
 * types and attributes, and reads rows of a dataset (a hyperslab) into a
 * buffer that is reused. The library is loaded on the first HDF5 file only,
 * so reading a CSV or WAV never pays for it.
 *
 * HDF5 reports a fault by printing its error stack to standard error and
 * returning a negative status. The stack is caught here instead (the
 * library's standard error is pointed at an unlinked temporary file) and its
 * innermost line becomes the message; h5wasm's own handler that throws from
 * inside the library is not used, as it leaks the library's stack on each
 * fault (it fails after some 1,800 faults in one process, measured).
 *
 * @module
 */
import { closeSync, fstatSync, ftruncateSync, openSync, readSync, unlinkSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import process from "node:process";
import type * as H5 from "npm:h5wasm@0.10.3";
import { QuiverError } from "../errors.ts";
import { contiguousStorage, type RawStorage } from "./hdf5_storage.ts";

/** An attribute's value as quiver uses it: a number, a text, a list of texts; null otherwise. */
export type Hdf5Attribute = number | string | readonly string[] | null;

/** The element type of a dataset, as far as quiver reads it. */
export type Hdf5Type =
  | "int8"
  | "uint8"
  | "int16"
  | "uint16"
  | "int32"
  | "uint32"
  | "int64"
  | "uint64"
  | "float32"
  | "float64"
  | "string"
  | "other";

/** A dataset: its path, shape, type, layout and attributes. */
export interface Hdf5Dataset {
  /** Path from the root: "/run1/acc". */
  readonly path: string;
  /** Its name in its group. */
  readonly name: string;
  /** Dimensions, slowest first ([] for a scalar). */
  readonly shape: readonly number[];
  /** Element type. */
  readonly type: Hdf5Type;
  /** Chunk dimensions, or null when stored contiguously. */
  readonly chunks: readonly number[] | null;
  /** Names of the filters applied to its chunks ("deflate", "shuffle"). */
  readonly filters: readonly string[];
  /** Its attributes by name. */
  readonly attrs: Readonly<Record<string, Hdf5Attribute>>;
}

/** A group: its path, attributes, datasets and subgroups' paths. */
export interface Hdf5Group {
  /** Path from the root ("/" for the root). */
  readonly path: string;
  /** Its attributes by name. */
  readonly attrs: Readonly<Record<string, Hdf5Attribute>>;
  /** Its datasets, in the library's (name) order. */
  readonly datasets: readonly Hdf5Dataset[];
  /** Paths of its subgroups. */
  readonly groups: readonly string[];
}

type H5Namespace = typeof import("npm:h5wasm@0.10.3");
type H5Module = typeof H5.Module;
let library: Promise<{ h5: H5Namespace; module: H5Module; diagnostics: number }> | undefined;

/** Loads h5wasm once, with HDF5's standard error caught in an unlinked temporary file. */
function load(): Promise<{ h5: H5Namespace; module: H5Module; diagnostics: number }> {
  library ??= (async () => {
    const h5 = await import("npm:h5wasm@0.10.3/node") as H5Namespace;
    const module = await h5.default.ready;
    const path = join(tmpdir(), `quiver-hdf5-${process.pid}-${Date.now()}.log`);
    const diagnostics = openSync(path, "a+");
    unlinkSync(path);
    // The library writes its error stack to its descriptor 2; send that to the file instead.
    const stderr = (h5.FS as unknown as { getStream(fd: number): { nfd: number } | null })
      .getStream(2);
    if (stderr !== null) stderr.nfd = diagnostics;
    return { h5, module, diagnostics };
  })();
  return library;
}

/** The innermost line of the error stack HDF5 printed since the last call, and clears it. */
function lastDiagnostic(fd: number): string {
  const size = fstatSync(fd).size;
  if (size === 0) return "";
  const bytes = new Uint8Array(Math.min(size, 1 << 16));
  readSync(fd, bytes, 0, bytes.length, Math.max(0, size - bytes.length));
  ftruncateSync(fd, 0);
  const lines = new TextDecoder().decode(bytes).split("\n")
    .filter((l) => /^\s*#\d+:/.test(l));
  const last = lines[lines.length - 1] ?? "";
  // "  #006: …/H5Fsuper.c line 577 in H5F__super_read(): truncated file: eof = …" → the words.
  return last.replace(/^\s*#\d+:.*?\(\):\s*/, "").trim();
}

function attributeValue(attribute: H5.Attribute): Hdf5Attribute {
  let value: unknown;
  try {
    value = attribute.value;
  } catch {
    return null;
  }
  if (typeof value === "number") return value;
  if (typeof value === "bigint") return Number(value);
  if (typeof value === "string") return value;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    const list = value as unknown as ArrayLike<number | bigint>;
    return list.length === 1 ? Number(list[0]) : null;
  }
  if (Array.isArray(value) && value.every((v) => typeof v === "string")) {
    return value.length === 1 ? value[0] : value;
  }
  return null;
}

function attributesOf(entity: H5.Group | H5.Dataset): Record<string, Hdf5Attribute> {
  const out: Record<string, Hdf5Attribute> = {};
  for (const [name, attribute] of Object.entries(entity.attrs)) {
    out[name] = attributeValue(attribute);
  }
  return out;
}

function typeOf(meta: H5.Metadata, module: H5Module): Hdf5Type {
  const classes = module.H5T_class_t;
  if (meta.type === classes.H5T_FLOAT.value) {
    return meta.size === 4 ? "float32" : meta.size === 8 ? "float64" : "other";
  }
  if (meta.type === classes.H5T_INTEGER.value && [1, 2, 4, 8].includes(meta.size)) {
    return `${meta.signed ? "int" : "uint"}${meta.size * 8}` as Hdf5Type;
  }
  if (meta.type === classes.H5T_STRING.value) return "string";
  return "other";
}

const ARRAYS = {
  int8: Int8Array,
  uint8: Uint8Array,
  int16: Int16Array,
  uint16: Uint16Array,
  int32: Int32Array,
  uint32: Uint32Array,
  float32: Float32Array,
  float64: Float64Array,
};

/** Bytes per element of a numeric type. */
export function typeBytes(type: Hdf5Type): number {
  const bits = Number(type.replace(/^\D+/, ""));
  if (!(bits > 0)) throw new RangeError(`${type} is not a numeric type`);
  return bits / 8;
}

/**
 * An HDF5 file opened for reading (the superblock and root group read, no
 * data): its tree by {@linkcode Hdf5File.groups}, rows of a dataset by
 * {@linkcode Hdf5File.readRows}. Close it when done.
 *
 * @example
 * ```ts
 * import { Hdf5File } from "./hdf5_file.ts";
 * let message = "";
 * try { await Hdf5File.open("/nonexistent/r.h5"); } catch (e) { message = (e as Error).message; }
 * if (!message.startsWith("/nonexistent/r.h5: ")) throw new Error(message);
 * ```
 */
export class Hdf5File {
  readonly #file: H5.File;
  readonly #module: H5Module;
  readonly #diagnostics: number;
  readonly #h5: H5Namespace;
  /** Path of the file as given. */
  readonly path: string;
  #pointer = 0;
  #capacity = 0;
  /** The file opened by node:fs for contiguous datasets' bytes; -1 until needed. */
  #fd = -1;
  #raw = new Uint8Array(0);
  /** Each dataset's contiguous storage, checked against the library's reading; null: none. */
  readonly #storage = new Map<string, RawStorage | null>();

  private constructor(
    path: string,
    file: H5.File,
    lib: { h5: H5Namespace; module: H5Module; diagnostics: number },
  ) {
    this.path = path;
    this.#file = file;
    this.#module = lib.module;
    this.#diagnostics = lib.diagnostics;
    this.#h5 = lib.h5;
  }

  /**
   * Opens the file (reading its superblock and root group only).
   *
   * @throws {QuiverError} (data) for a file HDF5 cannot open, with its reason
   * (a truncated file names the length it holds and the one it declares).
   */
  static async open(path: string): Promise<Hdf5File> {
    const lib = await load();
    lastDiagnostic(lib.diagnostics);
    let file: H5.File | undefined;
    try {
      file = new lib.h5.default.File(path, "r");
    } catch {
      file = undefined;
    }
    if (file === undefined || file.file_id < 0n) {
      const why = lastDiagnostic(lib.diagnostics);
      throw new QuiverError(
        `HDF5 cannot open the file${why === "" ? "" : `: ${plainWords(why)}`}`,
        { file: path },
      );
    }
    return new Hdf5File(path, file, lib);
  }

  /** A fault the library reported while doing `what`: its reason, then the stack cleared. */
  fault(what: string): QuiverError {
    const why = lastDiagnostic(this.#diagnostics);
    return new QuiverError(`${what}${why === "" ? "" : `: ${plainWords(why)}`}`, {
      file: this.path,
    });
  }

  /**
   * Every group of the file, the root first, each with its datasets (shapes,
   * types, attributes; no data read). Groups whose names start with "#"
   * (MATLAB's internal ones) are left out.
   *
   * @throws {QuiverError} (data) for a group or dataset the library cannot open.
   */
  groups(): Hdf5Group[] {
    const out: Hdf5Group[] = [];
    const visit = (group: H5.Group) => {
      const datasets: Hdf5Dataset[] = [];
      const groups: H5.Group[] = [];
      let names: string[];
      try {
        names = group.keys();
      } catch {
        throw this.fault(`group ${group.path} cannot be listed`);
      }
      for (const name of names) {
        if (name.startsWith("#")) continue;
        let entity: unknown;
        try {
          entity = group.get(name);
        } catch {
          throw this.fault(`${join(group.path, name)} cannot be opened`);
        }
        if (entity instanceof this.#h5.Group) groups.push(entity);
        else if (entity instanceof this.#h5.Dataset) {
          let meta: H5.Metadata;
          let filters: H5.Filter[];
          try {
            meta = entity.metadata;
            filters = entity.filters;
          } catch {
            throw this.fault(`dataset ${entity.path} cannot be opened`);
          }
          datasets.push({
            path: entity.path,
            name,
            shape: meta.shape ?? [],
            type: typeOf(meta, this.#module),
            chunks: meta.chunks,
            filters: filters.map((f) => f.name),
            attrs: attributesOf(entity),
          });
        }
      }
      out.push({
        path: group.path,
        attrs: attributesOf(group),
        datasets,
        groups: groups.map((g) => g.path),
      });
      for (const g of groups) visit(g);
    };
    visit(this.#file);
    return out;
  }

  /**
   * Reads `count` samples from sample `first` of a numeric dataset, as
   * doubles, into `out`. The samples run along dimension `axis` (0 or 1) of a
   * dataset of one or two dimensions; along dimension 0 of a 2-D dataset
   * every column is read, in row order (count × columns values), along
   * dimension 1 the one row (a MATLAB column vector). Read through HDF5's
   * hyperslab selection: only the chunks holding those samples are read.
   *
   * @throws {QuiverError} (data) for samples the library cannot read (a
   * chunk that does not inflate, a file cut short), naming the dataset and
   * the samples of the first chunk that fails.
   */
  readRows(dataset: Hdf5Dataset, first: number, count: number, out: Float64Array, axis = 0): void {
    const width = dataset.shape.length === 2 ? dataset.shape[1 - axis] : 1;
    const bytes = typeBytes(dataset.type);
    const need = count * width * bytes;
    const storage = this.storageOf(dataset, axis);
    if (storage !== null && this.#readRaw(dataset, storage, first * width * bytes, need, out)) {
      return;
    }
    this.#readLibrary(dataset, first, count, out, axis);
  }

  /**
   * The contiguous storage of a dataset whose rows along `axis` lie in one
   * run of bytes, which {@linkcode Hdf5File.readRows} reads straight from the
   * file, once its first and last rows read both ways agree; null otherwise
   * (chunked, filtered, big-endian, not written, a structure not known: the
   * library reads it).
   */
  storageOf(dataset: Hdf5Dataset, axis = 0): RawStorage | null {
    const { shape } = dataset;
    const runs = shape.length === 1 || (shape.length === 2 && (axis === 0 || shape[0] === 1));
    if (!runs || dataset.chunks !== null || dataset.filters.length > 0) return null;
    if (this.#storage.has(dataset.path)) return this.#storage.get(dataset.path)!;
    let storage: RawStorage | null = null;
    try {
      storage = this.#findStorage(dataset, axis);
    } catch {
      storage = null;
    }
    this.#storage.set(dataset.path, storage);
    return storage;
  }

  #findStorage(dataset: Hdf5Dataset, axis: number): RawStorage | null {
    const meta = this.#module.get_dataset_metadata(this.#file.file_id, dataset.path);
    if (
      !meta.littleEndian || meta.type !== this.#module.H5T_class_t.H5T_FLOAT.value &&
        meta.type !== this.#module.H5T_class_t.H5T_INTEGER.value
    ) return null;
    const length = dataset.shape[axis];
    const width = dataset.shape.length === 2 ? dataset.shape[1 - axis] : 1;
    const total = length * width * typeBytes(dataset.type);
    if (length < 1) return null;
    // An object reference holds the object header's address (relative to the superblock).
    const reference = Uint8Array.from(
      this.#module.create_object_reference(this.#file.file_id, dataset.path) as ArrayLike<number>,
    );
    if (reference.length < 8) return null;
    const header = Number(new DataView(reference.buffer).getBigUint64(0, true));
    if (this.#fd < 0) this.#fd = openSync(this.path, "r");
    const storage = contiguousStorage(this.#fd, header);
    if (storage === null || storage.bytes !== total) return null;
    if (storage.offset + total > fstatSync(this.#fd).size) return null;
    // Checked, not trusted: the first and last rows read raw must equal the library's.
    for (const at of length > 1 ? [0, length - 1] : [0]) {
      const a = new Float64Array(width), b = new Float64Array(width);
      this.#readLibrary(dataset, at, 1, a, axis);
      const bytes = width * typeBytes(dataset.type);
      if (!this.#readRaw(dataset, storage, at * bytes, bytes, b)) return null;
      for (let i = 0; i < width; i++) if (!Object.is(a[i], b[i])) return null;
    }
    return storage;
  }

  /** `need` bytes from `start` of a contiguous storage, as doubles into `out`; false if short. */
  #readRaw(
    dataset: Hdf5Dataset,
    storage: RawStorage,
    start: number,
    need: number,
    out: Float64Array,
  ): boolean {
    if (this.#raw.length < need) this.#raw = new Uint8Array(need);
    let got = 0;
    while (got < need) {
      const n = readSync(this.#fd, this.#raw, got, need - got, storage.offset + start + got);
      if (n <= 0) return false;
      got += n;
    }
    const heap = this.#raw.buffer as ArrayBuffer;
    const n = need / typeBytes(dataset.type);
    if (dataset.type === "int64" || dataset.type === "uint64") {
      const values = dataset.type === "int64"
        ? new BigInt64Array(heap, 0, n)
        : new BigUint64Array(heap, 0, n);
      for (let i = 0; i < n; i++) out[i] = Number(values[i]);
      return true;
    }
    const Kind = ARRAYS[dataset.type as keyof typeof ARRAYS];
    out.set(new Kind(heap, 0, n));
    return true;
  }

  /** Rows read through the library's hyperslab selection. */
  #readLibrary(
    dataset: Hdf5Dataset,
    first: number,
    count: number,
    out: Float64Array,
    axis: number,
  ): void {
    const width = dataset.shape.length === 2 ? dataset.shape[1 - axis] : 1;
    const bytes = typeBytes(dataset.type);
    const need = count * width * bytes;
    if (need > this.#capacity) {
      if (this.#pointer !== 0) this.#module._free(this.#pointer);
      this.#pointer = this.#module._malloc(need);
      if (this.#pointer === 0) throw new RangeError(`cannot allocate ${need} bytes for HDF5 rows`);
      this.#capacity = need;
    }
    const status = this.#read(dataset, first, count, axis);
    if (status < 0) throw this.#readFault(dataset, first, count, axis);
    // The library's memory may have grown (a new buffer): view it after the read.
    const heap = this.#module.HEAPU8.buffer as ArrayBuffer;
    const n = count * width;
    if (dataset.type === "int64" || dataset.type === "uint64") {
      const values = dataset.type === "int64"
        ? new BigInt64Array(heap, this.#pointer, n)
        : new BigUint64Array(heap, this.#pointer, n);
      for (let i = 0; i < n; i++) out[i] = Number(values[i]);
      return;
    }
    const Kind = ARRAYS[dataset.type as keyof typeof ARRAYS];
    out.set(new Kind(heap, this.#pointer, n));
  }

  #read(dataset: Hdf5Dataset, first: number, count: number, axis: number): number {
    const { shape } = dataset;
    let offset = [BigInt(first)], counts = [BigInt(count)];
    if (shape.length === 2) {
      offset = axis === 0 ? [BigInt(first), 0n] : [0n, BigInt(first)];
      counts = axis === 0 ? [BigInt(count), BigInt(shape[1])] : [BigInt(shape[0]), BigInt(count)];
    }
    try {
      return this.#module.get_dataset_data(
        this.#file.file_id,
        dataset.path,
        counts,
        offset,
        counts.map(() => 1n),
        BigInt(this.#pointer),
      );
    } catch {
      return -1;
    }
  }

  /** The fault of rows that failed: the first chunk among them that fails on its own. */
  #readFault(dataset: Hdf5Dataset, first: number, count: number, axis: number): QuiverError {
    const why = lastDiagnostic(this.#diagnostics);
    const step = dataset.chunks?.[axis] ?? count;
    let from = first, to = first + count;
    if (step < count) {
      for (let at = Math.floor(first / step) * step; at < first + count; at += step) {
        const a = Math.max(at, first), b = Math.min(at + step, first + count);
        if (this.#read(dataset, a, b - a, axis) < 0) {
          [from, to] = [a, b];
          break;
        }
      }
      lastDiagnostic(this.#diagnostics);
    }
    const compressed = dataset.filters.length > 0 && /filter/i.test(why)
      ? ` (a ${dataset.filters.join("+")} chunk that does not inflate)`
      : "";
    const rows = dataset.chunks !== null ? "the chunk of samples" : "samples";
    return new QuiverError(
      `dataset ${dataset.path}: ${rows} ${from}–${to - 1} cannot be read${
        why === "" ? "" : `: ${plainWords(why)}`
      }${compressed}`,
      { file: this.path },
    );
  }

  /** Closes the file and frees the row buffer. */
  close(): void {
    if (this.#fd >= 0) closeSync(this.#fd);
    this.#fd = -1;
    if (this.#pointer !== 0) this.#module._free(this.#pointer);
    this.#pointer = 0;
    this.#capacity = 0;
    try {
      this.#file.close();
    } catch {
      lastDiagnostic(this.#diagnostics); // a file that failed to read may fail to close: nothing lost
    }
  }
}

/** HDF5's reason in plain words (a truncated file's lengths said as such), trimmed. */
function plainWords(why: string): string {
  const cut = /truncated file: eof = (\d+),.*stored_eof = (\d+)/.exec(why);
  if (cut !== null) {
    return `truncated: the file holds ${cut[1]} bytes, its superblock declares ${cut[2]}`;
  }
  return why.replace(/\s+/g, " ").replace(/\.$/, "");
}
