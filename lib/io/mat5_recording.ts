/**
 * A MAT v5 file's variables as a recording. Channels: the real numeric
 * vectors (1×N or N×1) of one length, in file order, named as the
 * variables; a 2-D numeric matrix of samples × channels (more rows than
 * columns, rows as long as the vectors) gives channels `<var>_1` … `<var>_C`.
 * The time axis: a vector `t` or `time` (any case; `--time-column` names
 * another), checked to be uniform like a CSV's time column (every step within
 * 1 % of the median of the first 1001 steps). The rate: a scalar `sample_rate`
 * or `fs` (any case), else the time vector, else `--rate`; when several are
 * there they must agree within 0.1 %. A char variable `<name>_unit` gives a
 * channel's unit (the same for every column of a matrix). Everything else is
 * listed as not read, never dropped unseen.
 *
 * @module
 */
import type { FileHandle } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { CHAR_CLASS, isNumericClass, MI, MI_SIZE, MX_CLASS } from "./mat5_elements.ts";
import {
  type Mat5Directory,
  mat5Fault,
  Mat5Values,
  type Mat5Variable,
  readText,
  readWhole,
  variableAt,
} from "./mat5_file.ts";
import { checkName } from "./names.ts";
import { CHUNK_ROWS } from "./recording_source.ts";

/** One channel: a vector, or a column of a samples × channels matrix. */
export interface Mat5Channel {
  readonly name: string;
  readonly unit: string;
  readonly variable: Mat5Variable;
  /** Index of the channel's first value in the variable (a column's start). */
  readonly first: number;
  /** 1-based place of its variable in the file. */
  readonly position: number;
}

/** The recording a MAT v5 file holds. */
export interface Mat5Layout {
  readonly channels: readonly Mat5Channel[];
  readonly length: number;
  readonly rate: number;
  readonly rateFrom: string;
  readonly startTime: number;
  /** Variables not read, in words. */
  readonly unsupported: readonly string[];
}

/** Options that bear on the layout. */
export interface Mat5LayoutOptions {
  rate?: number;
  timeColumn?: string;
  timeTolerance?: number;
}

const RATE_NAMES = new Set(["sample_rate", "fs"]);
const TIME_NAMES = new Set(["t", "time"]);
/** Steps whose median is the reference of the uniformity check (as for a CSV time column). */
const REFERENCE_STEPS = 1001;

type Kind = "scalar" | "vector" | "matrix" | "unit" | "other";

/** What a variable is to the recording, with the words for one not read. */
function kindOf(v: Mat5Variable, path: string): { kind: Kind; why?: string } {
  const [rows, cols] = v.dims;
  const shape = v.dims.join("×");
  // MATLAB keeps the contents of objects (string, table, datetime) in one unnamed variable at the
  // end of the file, the header's subsystem data: not a channel.
  if (v.name === "") return { kind: "other", why: "unnamed (MATLAB's subsystem data of objects)" };
  if (v.classId === CHAR_CLASS) {
    return v.name.endsWith("_unit") && v.dims.length === 2 && rows <= 1
      ? { kind: "unit" }
      : { kind: "other", why: `a ${shape} char array` };
  }
  if (!isNumericClass(v.classId)) {
    return { kind: "other", why: `a ${MX_CLASS[v.classId] ?? `class ${v.classId}`} array` };
  }
  if (v.complex) return { kind: "other", why: "complex values (quiver reads real samples)" };
  if (v.logical) return { kind: "other", why: `a ${shape} logical array` };
  const real = v.real as NonNullable<Mat5Variable["real"]>;
  const size = MI_SIZE[real.type];
  const count = v.dims.reduce((a, b) => a * b, 1);
  if (size === undefined || real.type === MI.UTF8) {
    throw mat5Fault(path, `${variableAt(v)}: its values are of data type ${real.type}`);
  }
  if (real.bytes !== count * size) {
    throw mat5Fault(
      path,
      `${variableAt(v)}: its data holds ${real.bytes} bytes, not the ${
        count * size
      } of ${shape} values`,
    );
  }
  if (count === 0) return { kind: "other", why: `an empty ${shape} array` };
  if (v.dims.length > 2) return { kind: "other", why: `a ${shape} array` };
  if (count === 1) return { kind: "scalar" };
  if (rows === 1 || cols === 1) return { kind: "vector" };
  return rows > cols
    ? { kind: "matrix" }
    : { kind: "other", why: `a ${shape} matrix (samples × channels needs more rows than columns)` };
}

/**
 * The recording in a MAT v5 file: channels, length, rate and where it
 * comes from, start time, and what is not read. Reads the scalars, the unit
 * texts and the time vector (streamed, to check it); no channel's values.
 *
 * @throws {QuiverError} for vectors of different lengths, no channel, no
 * rate (usage), rates that disagree (usage), a time vector that is not
 * uniform, or a bad element (naming variable and offset).
 *
 * @example
 * ```ts
 * import { mat5Layout } from "./mat5_recording.ts";
 * import { scanMat5 } from "./mat5_file.ts";
 * import { open, mkdtemp, writeFile } from "node:fs/promises";
 * // Variable "a" = [1, 2] (as in scanMat5's example); the rate comes from --rate.
 * const head = new Uint8Array(128);
 * head.set([0x00, 0x01, 0x49, 0x4d], 124);
 * const body = new Uint32Array([14, 64, 6, 8, 6, 0, 5, 8, 1, 2, 0x00010001, 0x61, 9, 16, 0, 0x3ff00000, 0, 0x40000000]);
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const path = `${dir}/a.mat`;
 * await writeFile(path, new Uint8Array([...head, ...new Uint8Array(body.buffer)]));
 * const handle = await open(path, "r");
 * const layout = await mat5Layout(path, handle, await scanMat5(path, handle, true), { rate: 100 });
 * await handle.close();
 * if (layout.length !== 2 || layout.channels[0].name !== "a" || layout.rateFrom !== "--rate") throw new Error();
 * ```
 */
export async function mat5Layout(
  path: string,
  handle: FileHandle,
  directory: Mat5Directory,
  options: Mat5LayoutOptions,
): Promise<Mat5Layout> {
  const le = directory.littleEndian;
  const unsupported: string[] = [...directory.other];
  const kinds = directory.variables.map((v) => ({ v, ...kindOf(v, path) }));
  const byName = new Map(directory.variables.map((v) => [v.name, v]));
  // The time vector: named by --time-column, else t or time.
  let time: Mat5Variable | undefined;
  if (options.timeColumn !== undefined) {
    time = byName.get(options.timeColumn);
    if (time === undefined || kinds.find((k) => k.v === time)?.kind !== "vector") {
      throw new QuiverError(
        `--time-column "${options.timeColumn}" names no numeric vector in the file`,
        { file: path },
        "usage",
      );
    }
  } else {
    for (const k of kinds) {
      if (k.kind !== "vector" || !TIME_NAMES.has(k.v.name.toLowerCase())) continue;
      if (time !== undefined) {
        throw mat5Fault(
          path,
          `two time vectors: ${variableAt(time)} and ${
            variableAt(k.v)
          }; name one with --time-column`,
        );
      }
      time = k.v;
    }
  }
  const channels: Mat5Channel[] = [];
  let length = -1;
  let lengthOf: Mat5Variable | undefined;
  const sameLength = (v: Mat5Variable, n: number) => {
    if (length < 0) {
      length = n;
      lengthOf = v;
    } else if (n !== length) {
      throw mat5Fault(
        path,
        `vectors of different lengths: ${
          variableAt(lengthOf as Mat5Variable)
        } holds ${length} samples, ${variableAt(v)} ${n}`,
      );
    }
  };
  const rates: { v: Mat5Variable; value: number }[] = [];
  for (const [i, k] of kinds.entries()) {
    const { v } = k;
    if (k.kind === "vector") {
      sameLength(v, Math.max(v.dims[0], v.dims[1]));
      if (v !== time) {
        channels.push({ name: v.name, unit: "", variable: v, first: 0, position: i + 1 });
      }
    } else if (k.kind === "matrix") {
      const [rows, cols] = v.dims;
      sameLength(v, rows);
      for (let c = 0; c < cols; c++) {
        channels.push({
          name: `${v.name}_${c + 1}`,
          unit: "",
          variable: v,
          first: c * rows,
          position: i + 1,
        });
      }
    } else if (k.kind === "scalar" && RATE_NAMES.has(v.name.toLowerCase())) {
      rates.push({ v, value: (await readWhole(path, handle, v, le))[0] });
    } else if (k.kind === "scalar") {
      unsupported.push(
        `${variableAt(v)}: a scalar (not a sample rate: named neither sample_rate nor fs)`,
      );
    } else if (k.kind === "other") {
      unsupported.push(`${variableAt(v)}: ${k.why}`);
    }
  }
  if (channels.length === 0) {
    throw mat5Fault(
      path,
      `no numeric vector to read as a channel (quiver reads real numeric vectors of one length${
        unsupported.length > 0 ? `; not read: ${unsupported.join("; ")}` : ""
      })`,
    );
  }
  // Units: `<name>_unit` for a channel's variable (or the time vector's, which must be seconds).
  const units = new Map<Mat5Variable, string>();
  for (const k of kinds) {
    if (k.kind !== "unit") continue;
    const owner = byName.get(k.v.name.slice(0, -"_unit".length));
    const text = (await readText(path, handle, k.v, le)).trim();
    if (owner !== undefined && owner === time) {
      if (text !== "s" && text !== "") {
        throw mat5Fault(
          path,
          `the time vector "${owner.name}" is in [${text}]; quiver expects seconds [s]`,
        );
      }
    } else if (owner !== undefined && channels.some((c) => c.variable === owner)) {
      checkName(text, `the unit of "${owner.name}"`, { file: path });
      units.set(owner, text);
    } else {
      unsupported.push(`${variableAt(k.v)}: a unit for no channel`);
    }
  }
  for (const c of channels) {
    checkName(c.name, `variable at byte ${c.variable.offset}`, { file: path });
  }
  const { rate, rateFrom, startTime } = await rateOf(path, handle, le, {
    rates,
    time,
    length,
    options,
  });
  return {
    channels: channels.map((c) => ({ ...c, unit: units.get(c.variable) ?? "" })),
    length,
    rate,
    rateFrom,
    startTime,
    unsupported,
  };
}

/** The rate from the scalars, the time vector and `--rate`, checked against each other. */
async function rateOf(
  path: string,
  handle: FileHandle,
  le: boolean,
  found: {
    rates: { v: Mat5Variable; value: number }[];
    time: Mat5Variable | undefined;
    length: number;
    options: Mat5LayoutOptions;
  },
): Promise<{ rate: number; rateFrom: string; startTime: number }> {
  const { rates, time, length, options } = found;
  const sources: { from: string; rate: number }[] = [];
  for (const r of rates) {
    if (!(r.value > 0) || !Number.isFinite(r.value)) {
      throw mat5Fault(path, `${variableAt(r.v)}: a sample rate of ${r.value} Hz`);
    }
    sources.push({ from: `the variable "${r.v.name}"`, rate: r.value });
  }
  let startTime = 0;
  if (time !== undefined) {
    const t = await checkTimes(path, handle, time, le, length, options.timeTolerance ?? 0.01);
    startTime = t.start;
    sources.push({ from: `the time vector "${time.name}"`, rate: t.rate });
  }
  const disagree = (a: { from: string; rate: number }, b: { from: string; rate: number }) =>
    Math.abs(a.rate - b.rate) > 1e-3 * b.rate;
  for (const s of sources.slice(1)) {
    if (disagree(s, sources[0])) {
      throw mat5Fault(
        path,
        `${sources[0].from} gives a rate of ${formatNumber(sources[0].rate, 8)} Hz, ${s.from} ${
          formatNumber(s.rate, 8)
        } Hz`,
      );
    }
  }
  const agreeing = sources.length > 1
    ? `, agreeing with ${sources.slice(1).map((s) => s.from).join(" and ")}`
    : "";
  if (options.rate !== undefined) {
    const given = { from: "--rate", rate: options.rate };
    const against = sources.find((s) => disagree(given, s));
    if (against !== undefined) {
      throw new QuiverError(
        `${against.from} gives a rate of ${
          formatNumber(against.rate, 8)
        } Hz, but ${options.rate} Hz was given`,
        { file: path },
        "usage",
      );
    }
    return {
      rate: options.rate,
      rateFrom: sources.length > 0
        ? `--rate, agreeing with ${sources.map((s) => s.from).join(" and ")}`
        : "--rate",
      startTime,
    };
  }
  if (sources.length === 0) {
    throw new QuiverError(
      "no sample rate: the file holds no scalar sample_rate or fs and no time vector t or time; give it with --rate HZ",
      { file: path },
      "usage",
    );
  }
  return { rate: sources[0].rate, rateFrom: `${sources[0].from}${agreeing}`, startTime };
}

/**
 * The rate and start of a time vector, read in chunks: every value finite,
 * every step positive and within `tolerance` of the median of the first
 * {@linkcode REFERENCE_STEPS} steps. The rate is (n − 1)/span, or the nominal
 * rate (whole Hz … 0.001 Hz) when that span matches within the values'
 * precision.
 */
async function checkTimes(
  path: string,
  handle: FileHandle,
  v: Mat5Variable,
  le: boolean,
  n: number,
  tolerance: number,
): Promise<{ rate: number; start: number }> {
  const fail = (detail: string): never => {
    throw mat5Fault(path, `the time vector ${variableAt(v)}: ${detail}`);
  };
  const values = new Mat5Values(path, handle, v, le, 0, n);
  const buffer = new Float64Array(Math.min(CHUNK_ROWS, n));
  const head: number[] = [];
  let reference = NaN, previous = NaN, first = NaN;
  const judge = (dt: number, i: number) => {
    if (Math.abs(dt - reference) > tolerance * reference) {
      fail(
        `not uniform: the step to sample ${i} is ${formatNumber(dt, 8)} s, the median step ${
          formatNumber(reference, 8)
        } s`,
      );
    }
  };
  const settle = () => {
    const sorted = head.slice().sort((a, b) => a - b);
    reference = sorted[Math.floor((sorted.length - 1) / 2)];
    head.forEach((dt, j) => judge(dt, j + 1));
  };
  try {
    for (let at = 0; at < n; at += CHUNK_ROWS) {
      const count = Math.min(CHUNK_ROWS, n - at);
      await values.read(buffer, count);
      for (let j = 0; j < count; j++) {
        const x = buffer[j], i = at + j;
        if (x - x !== 0) fail(`sample ${i} is ${x}, not a finite number`);
        if (i === 0) first = x;
        else {
          const dt = x - previous;
          if (!(dt > 0)) {
            fail(`time goes backwards or stands still at sample ${i} (${previous} s, then ${x} s)`);
          }
          if (!Number.isNaN(reference)) judge(dt, i);
          else if (head.push(dt) === REFERENCE_STEPS) settle();
        }
        previous = x;
      }
    }
  } finally {
    values.close();
  }
  if (Number.isNaN(reference)) settle();
  const span = previous - first;
  const measured = (n - 1) / span;
  // Values of float64 (float32) times are exact to ~1e-16 (1e-7) of the span: a nominal rate fits.
  const precision = (v.real as NonNullable<Mat5Variable["real"]>).type === MI.SINGLE ? 1e-6 : 1e-9;
  for (let digits = 0; digits <= 3; digits++) {
    const candidate = Math.round(measured * 10 ** digits) / 10 ** digits;
    if (candidate > 0 && Math.abs((n - 1) / candidate - span) <= precision * span) {
      return { rate: candidate, start: first };
    }
  }
  return { rate: measured, start: first };
}
