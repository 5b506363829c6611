/**
 * Whole-body (ISO 2631-1) and hand-arm (ISO 5349-1) vibration of a
 * recording: the analyses behind `quiver comfort` and `quiver hand-arm`.
 * Each channel is weighted by its digital weighting filter
 * (vibration_weighting.ts) chunk by chunk, the filter state carried from
 * chunk to chunk, and assessed (vibration_metrics.ts); memory stays flat in
 * the record's length (the history, if asked for, is one value per 0.1 s).
 *
 * The numbers are for engineering comparison between vehicles, builds and
 * targets, not a certified measurement of a person's exposure
 * ({@linkcode SAFETY_NOTE}).
 *
 * @module
 */
import { channelIndices } from "../io/recording.ts";
import type { ColumnValues, Table, TableColumn, TableMetadata } from "../io/table.ts";
import { asStream, readChecked, type RecordingSource } from "../io/recording_stream.ts";
import { CascadeFilter } from "../acoustics/biquad.ts";
import { VibrationMeter, type VibrationValues } from "./vibration_metrics.ts";
import {
  leastRate,
  type VibrationWeighting,
  weightingSections,
  worstDeviationDb,
} from "./vibration_weighting.ts";
import { AXES, type Axis, axisFactors, type Location, type Purpose } from "./axis_factors.ts";
import type { ComfortMetadata } from "./comfort_metadata.ts";
import type { HandArmMetadata } from "./hand_arm_metadata.ts";

/** What every comfort and hand-arm result, its help and README say of the numbers. */
export const SAFETY_NOTE =
  "Engineering comparison between vehicles, builds and targets, not a certified measurement " +
  "of a person's exposure to vibration; for exposure, defer to local regulations and licensed " +
  "practice.";

/** The integration time of the running r.m.s. (ISO 2631-1 6.3.1), s. */
export const TAU_S = 1;
/** Seconds between the running r.m.s. values of the history. */
export const HISTORY_STEP_S = 0.1;

/** The channel of each axis. */
export type AxisChannels = Readonly<Record<Axis, string>>;

/** Options of {@linkcode comfortAnalysis}: channels with one weighting, or three axes. */
export type ComfortOptions =
  | {
    /** The weighting of every channel. */
    readonly weighting: VibrationWeighting;
    /** Channels. Default: all. */
    readonly channels?: readonly string[];
  }
  | {
    /** The channel of each axis. */
    readonly axes: AxisChannels;
    /** Where the vibration enters the body. */
    readonly location: Location;
    /** What the assessment is for. */
    readonly purpose: Purpose;
  };

/** Options of {@linkcode handArmAnalysis}. */
export interface HandArmOptions {
  /** The channel of each axis. */
  readonly axes: AxisChannels;
  /** Daily exposure time, h, for A(8). Default: none (no A(8)). */
  readonly exposureHours?: number;
}

/** A result table, its history (running r.m.s. against time) and its warnings. */
export interface VibrationResult<M extends TableMetadata> {
  readonly table: Table<M, ColumnValues>;
  readonly history: Table<Record<string, unknown>>;
  readonly warnings: readonly string[];
}

interface Spec {
  readonly axis: string;
  readonly index: number;
  readonly weighting: VibrationWeighting;
  readonly k: number;
}

interface Weighed {
  readonly rows: (Spec & { channel: string; values: VibrationValues })[];
  readonly history: Table<Record<string, unknown>>;
  readonly filters: { weighting: string; least_rate_hz: number; worst_deviation_db: number }[];
  readonly rate: number;
  readonly duration: number;
  readonly warnings: string[];
}

/** Weighs and assesses the channels of `specs`, reading the record once. */
async function weigh(source: RecordingSource, specs: readonly Spec[]): Promise<Weighed> {
  const stream = asStream(source);
  const { rate } = stream;
  for (const s of specs) {
    const c = stream.channels[s.index];
    if (c.unit !== "m/s^2") {
      throw new RangeError(
        `channel "${c.name}" is in ${c.unit === "" ? "no unit" : c.unit}, not an acceleration: ` +
          `give it m/s^2, mm/s^2 or g in the set-up`,
      );
    }
  }
  const weightings = [...new Set(specs.map((s) => s.weighting))];
  const sections = new Map(weightings.map((w) => [w, weightingSections(w, rate)]));
  const filters = specs.map((s) => new CascadeFilter(sections.get(s.weighting)!));
  const historyStep = Math.max(1, Math.round(HISTORY_STEP_S * rate));
  const meters = specs.map(() => new VibrationMeter(rate, { tau: TAU_S, historyStep }));
  const indices = [...new Set(specs.map((s) => s.index))];
  const scratch = specs.map(() => new Float64Array(0));
  const warnings = await readChecked(stream, indices, (chunk) => {
    specs.forEach((s, i) => {
      // A channel may be read under two weightings: each filter works on its own copy.
      const x = chunk[indices.indexOf(s.index)];
      if (scratch[i].length !== x.length) scratch[i] = new Float64Array(x.length);
      scratch[i].set(x);
      meters[i].push(filters[i].process(scratch[i]));
    });
  });
  if (stream.length / rate < TAU_S) {
    warnings.push(
      `the record of ${
        stream.length / rate
      } s is shorter than the running r.m.s.'s τ = ${TAU_S} s: ` +
        `no MTVV`,
    );
  }
  const rows = specs.map((s, i) => ({
    ...s,
    channel: stream.channels[s.index].name,
    values: meters[i].finish(),
  }));
  const count = rows[0]?.values.history.length ?? 0;
  const first = Math.round(TAU_S * rate);
  const time = new Float64Array(count).map((_, j) =>
    stream.startTime + (first - 1 + j * historyStep) / rate
  );
  return {
    rows,
    rate,
    duration: stream.length / rate,
    warnings,
    filters: weightings.map((w) => ({
      weighting: w,
      least_rate_hz: leastRate(w),
      worst_deviation_db: worstDeviationDb(w, rate),
    })),
    history: {
      columns: [
        { name: "time_s", unit: "", values: time },
        ...rows.map((r) => ({
          name: r.axis === "" ? r.channel : `${r.axis}:${r.channel}`,
          unit: "m/s^2",
          values: r.values.history,
        })),
      ],
      metadata: { analysis: "running_rms", tau_s: TAU_S, step_s: historyStep / rate },
    },
  };
}

type Row = ComfortMetadata["rows"][number];

const finite = (v: number) => (Number.isFinite(v) ? v : null);

function rowOf(r: Weighed["rows"][number]): Row {
  const v = r.values;
  return {
    axis: r.axis,
    channel: r.channel,
    weighting: r.weighting,
    k: r.k,
    aw: finite(v.aw),
    mtvv: finite(v.mtvv),
    vdv: finite(v.vdv),
    crest_factor: finite(v.crestFactor),
    mtvv_ratio: finite(v.mtvvRatio),
    vdv_ratio: finite(v.vdvRatio),
    flags: v.flags,
  };
}

/** The result table: one row per channel or axis, then the sum row if any. */
function rowsTable(rows: readonly Row[]): TableColumn<ColumnValues>[] {
  const numbers = (key: keyof Row) =>
    Float64Array.from(rows, (r) => (typeof r[key] === "number" ? r[key] as number : NaN));
  return [
    { name: "axis", unit: "", values: rows.map((r) => r.axis) },
    { name: "channel", unit: "", values: rows.map((r) => r.channel) },
    { name: "weighting", unit: "", values: rows.map((r) => r.weighting) },
    { name: "k", unit: "", values: numbers("k") },
    { name: "aw", unit: "m/s^2", values: numbers("aw") },
    { name: "mtvv", unit: "m/s^2", values: numbers("mtvv") },
    { name: "vdv", unit: "m/s^1.75", values: numbers("vdv") },
    { name: "crest_factor", unit: "", values: numbers("crest_factor") },
    { name: "mtvv_ratio", unit: "", values: numbers("mtvv_ratio") },
    { name: "vdv_ratio", unit: "", values: numbers("vdv_ratio") },
    { name: "flags", unit: "", values: rows.map((r) => r.flags.join(";")) },
  ];
}

/** The `sum` row: a_v = √Σ(k·a_w)² and VDV_total = (Σ(k·VDV)⁴)^¼; the rest empty. */
function sumRow(rows: readonly Row[], withVdv: boolean): Row {
  let a2 = 0, v4 = 0;
  for (const r of rows) {
    a2 += ((r.k ?? NaN) * (r.aw ?? NaN)) ** 2;
    v4 += ((r.k ?? NaN) * (r.vdv ?? NaN)) ** 4;
  }
  return {
    axis: "sum",
    channel: "",
    weighting: "",
    k: null,
    aw: finite(Math.sqrt(a2)),
    mtvv: null,
    vdv: withVdv ? finite(v4 ** 0.25) : null,
    crest_factor: null,
    mtvv_ratio: null,
    vdv_ratio: null,
    flags: [],
  };
}

function axisSpecs(
  stream: { channels: readonly { name: string }[] },
  axes: AxisChannels,
  factor: (axis: Axis) => { weighting: VibrationWeighting; k: number },
): Spec[] {
  const indices = channelIndices(stream.channels, AXES.map((a) => axes[a]));
  return AXES.map((axis, i) => ({ axis, index: indices[i], ...factor(axis) }));
}

/**
 * Whole-body vibration of a recording: every channel (or those named)
 * weighted by one weighting, or three axes weighted and multiplied by the
 * factors of ISO 2631-1 for a location and purpose, with the vector sum.
 *
 * @throws {RangeError} for a rate below the weighting's least, a channel
 * not in m/s², or a location and purpose ISO 2631-1 gives no factors for.
 *
 * @example
 * ```ts
 * import { comfortAnalysis } from "./comfort_analysis.ts";
 * import { analyticResponse } from "./vibration_weighting.ts";
 * // 1 m/s² amplitude at 6.3 Hz... for 10 s at 1 kHz, Wk: a_w = |Wk(6.3)|/√2.
 * const f = 6.3, data = new Float64Array(10000).map((_, i) => Math.sin(2 * Math.PI * f * i / 1000));
 * const r = await comfortAnalysis({ rate: 1000, startTime: 0, channels: [{ name: "z", unit: "m/s^2", data }] },
 *   { weighting: "wk" });
 * const h = analyticResponse("wk", f), expected = Math.hypot(h.re, h.im) / Math.SQRT2;
 * if (Math.abs(r.table.metadata.rows[0].aw! / expected - 1) > 0.01) throw new Error();
 * ```
 */
export async function comfortAnalysis(
  source: RecordingSource,
  options: ComfortOptions,
): Promise<VibrationResult<ComfortMetadata>> {
  const stream = asStream(source);
  const axes = "axes" in options;
  const specs = axes
    ? axisSpecs(stream, options.axes, (a) => axisFactors(options.location, options.purpose)[a])
    : channelIndices(stream.channels, options.channels).map((index) => ({
      axis: "",
      index,
      weighting: options.weighting,
      k: 1,
    }));
  const w = await weigh(stream, specs);
  const rows = w.rows.map(rowOf);
  if (axes) rows.push(sumRow(rows, true));
  return {
    warnings: w.warnings,
    history: w.history,
    table: {
      columns: rowsTable(rows),
      metadata: {
        analysis: "comfort",
        unit: "m/s^2",
        rate_hz: w.rate,
        tau_s: TAU_S,
        duration_s: w.duration,
        location: axes ? options.location : null,
        purpose: axes ? options.purpose : null,
        rows,
        filters: w.filters,
        safety: SAFETY_NOTE,
        warnings: w.warnings,
      },
    },
  };
}

/**
 * Hand-arm vibration of a recording (ISO 5349-1): Wh on each axis, the
 * vibration total value a_hv = √(a_hwx² + a_hwy² + a_hwz²) and, with an
 * exposure time T, the daily exposure A(8) = a_hv·√(T/8 h).
 *
 * @throws {RangeError} for a rate below Wh's least (5035.6 Hz), a channel
 * not in m/s², or an exposure time that is not positive.
 *
 * @example
 * ```ts
 * import { handArmAnalysis } from "./comfort_analysis.ts";
 * const n = 20000, sine = (f: number) => new Float64Array(n).map((_, i) => Math.sin(2 * Math.PI * f * i / 10000));
 * const channels = ["x", "y", "z"].map((name) => ({ name, unit: "m/s^2", data: sine(80) }));
 * const r = await handArmAnalysis({ rate: 10000, startTime: 0, channels }, { axes: { x: "x", y: "y", z: "z" }, exposureHours: 2 });
 * const m = r.table.metadata;
 * if (Math.abs(m.a8! - m.a_hv! * 0.5) > 1e-12) throw new Error();
 * ```
 */
export async function handArmAnalysis(
  source: RecordingSource,
  options: HandArmOptions,
): Promise<VibrationResult<HandArmMetadata>> {
  const hours = options.exposureHours;
  if (hours !== undefined && !(hours > 0 && Number.isFinite(hours))) {
    throw new RangeError(`the exposure time must be a positive number of hours, got ${hours}`);
  }
  const stream = asStream(source);
  const specs = axisSpecs(stream, options.axes, () => ({ weighting: "wh", k: 1 }));
  const w = await weigh(stream, specs);
  const rows = w.rows.map(rowOf);
  const sum = sumRow(rows, false);
  rows.push(sum);
  const a8 = hours === undefined || sum.aw === null ? null : sum.aw * Math.sqrt(hours / 8);
  return {
    warnings: w.warnings,
    history: w.history,
    table: {
      columns: rowsTable(rows),
      metadata: {
        analysis: "hand-arm",
        unit: "m/s^2",
        rate_hz: w.rate,
        tau_s: TAU_S,
        duration_s: w.duration,
        rows,
        filters: w.filters,
        a_hv: sum.aw,
        exposure_hours: hours ?? null,
        a8,
        safety: SAFETY_NOTE,
        warnings: w.warnings,
      },
    },
  };
}
