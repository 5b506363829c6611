/**
 * Impact testing from one continuous recording: find the hits, cut one
 * record per hit, window it, and average H1 over the accepted hits only.
 *
 * Per record (all channels): the mean of the first half of the pre-trigger
 * is removed. The force then gets the force window: 1 from the record start
 * to the end of the force window, with a half-cosine taper over its last
 * quarter, and 0 after (default length: the pre-trigger plus four times the
 * median pulse width). An optional exponential window exp(−t/τ), t from the
 * record start, goes on every channel (force and responses alike, so the
 * FRF is that of the structure with added damping 1/(τ·ωn), which the
 * damping analysis removes; Ewins, Modal Testing, 2nd ed., sec. 3.11).
 * The records then go through the spectral core with a rectangular window
 * and no further detrend; coherence comes out across hits.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { channelIndices } from "../io/recording.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import { type SampleSeries, withChannelSeries } from "../io/sample_series.ts";
import type { Table, TableColumn, TableMetadata } from "../io/table.ts";
import type { HammerMetadata, HammerRecordsMetadata } from "./hammer_metadata.ts";
import { segmentMetadata } from "../dsp/segment_metadata.ts";
import { SpectralAccumulator } from "../dsp/spectral_core.ts";
import type { FrfForm } from "./forms.ts";
import { frfTableParts, SINGLE_AVERAGE_WARNING } from "./frf_analysis.ts";
import type { FrfData } from "./frf_data.ts";
import { findHits, type Hit, NOISE_SIGMAS } from "./hits.ts";
import { formatNumber } from "../format_number.ts";

/** Options of {@linkcode hammerFrf}. */
export interface HammerOptions {
  /** Force (hammer) channel. Required. */
  force: string;
  /** Response channels. Required, at least one. */
  outputs: readonly string[];
  /** Trigger level above the local baseline in the force's unit. Default: derived (see hits.ts). */
  trigger?: number;
  /**
   * Block length of the force's local baseline in seconds (the median of
   * each block, linear between blocks; see hits.ts). Default
   * {@linkcode DEFAULT_BASELINE_S}.
   */
  baseline?: number;
  /** Pre-trigger in seconds. Default 0.01 s. */
  pretrigger?: number;
  /** Record length in seconds. Default: derived from the hit spacing (see hits.ts). */
  record?: number;
  /** Force window length in seconds from the record start. Default: pre-trigger + 4 pulse widths. */
  forceWindow?: number;
  /** Exponential window time constant τ in seconds. Default: none. */
  expTau?: number;
  /** Exponential window given by its value at the record end, in (0, 1). Default: none. */
  expEnd?: number;
  /** Force channel full-scale range; peaks at or above it are overloads. Default: none. */
  range?: number;
  /** Output FRF form. Default: the measured form. */
  form?: FrfForm;
}

/** The averaged FRF, the hit log and the warnings. */
export interface HammerResult {
  /** The FRFs, typed, with the exponential window's time constant when one was applied. */
  readonly frf: FrfData;
  /** FRF table, the same layout as `frf`'s. */
  readonly table: Table<HammerMetadata>;
  /** Hit log: `hit`, `time_s`, `peak`, `status`. */
  readonly hitLog: Table<TableMetadata, Float64Array | readonly string[]>;
  /** The hits with their classification. */
  readonly hits: readonly Hit[];
  /** Warnings, also in the table's metadata. */
  readonly warnings: readonly string[];
  /** One line such as "6 hits: 4 accepted, 1 double, 1 overload". */
  readonly summary: string;
  /** How the trigger level was chosen, in words. */
  readonly triggerRule: string;
  /** Where the force autospectrum has fallen {@linkcode USABLE_DROP_DB} below its low-frequency level. */
  readonly usableBandwidth: UsableBandwidth;
  /** Every hit's record (force and first response, as seen before windowing), for a quality plot. */
  readonly hitRecords: Table<HammerRecordsMetadata>;
}

/**
 * How far the force autospectrum may fall below its low-frequency level
 * before the excitation is too weak to trust the FRF (common practice takes
 * 10 to 20 dB; quiver takes 20).
 */
export const USABLE_DROP_DB = 20;

/**
 * The lowest value the exponential window may fall to at the record's end:
 * 10⁻⁴ (−80 dB), so τ ≥ T/ln(10⁴) ≈ T/9.2 for a record of T seconds. Common
 * practice ends the window near 1 to 5 % (τ ≈ T/4.6 … T/3); a shorter τ
 * leaves little of the response, and the damping it adds (1/τ on every
 * pole) swamps the structure's. The bound is ours, twice as short as the
 * shortest common choice.
 */
export const EXP_WINDOW_END_FLOOR = 1e-4;

/**
 * When a response's median coherence over the lines is below this, its FRF
 * is warned of (ours: half its power unrelated to the force at most lines).
 */
export const LOW_COHERENCE = 0.5;

/** The hammer's usable frequency range. */
export interface UsableBandwidth {
  /** Upper limit, Hz: the first line where the force autospectrum is USABLE_DROP_DB down. */
  readonly limitHz: number;
  /** The low-frequency level it is measured from, in the force's unit²/Hz. */
  readonly referenceLevel: number;
  /** Whether the spectrum fell that far within the analysed band (false: the limit is Nyquist). */
  readonly reached: boolean;
}

/**
 * The usable bandwidth of an impact: the first line above which the force
 * autospectrum is {@linkcode USABLE_DROP_DB} below its mean over the lowest
 * 2 % of the band (at least one line above 0 Hz).
 *
 * @example
 * ```ts
 * import { usableBandwidth } from "./hammer.ts";
 * // A force spectrum flat at 1 up to 300 Hz, then 30 dB down.
 * const f = new Float64Array(1001).map((_, k) => k);
 * const g = f.map((v) => (v <= 300 ? 1 : 1e-3));
 * const u = usableBandwidth(f, g);
 * if (u.limitHz !== 301 || !u.reached) throw new Error();
 * ```
 */
export function usableBandwidth(frequencies: Float64Array, gff: Float64Array): UsableBandwidth {
  const lines = frequencies.length;
  const low = Math.max(1, Math.round(0.02 * lines));
  let sum = 0, count = 0;
  for (let k = 1; k <= Math.min(low, lines - 1); k++) {
    sum += gff[k];
    count++;
  }
  const referenceLevel = count > 0 ? sum / count : gff[0];
  const floor = referenceLevel * 10 ** (-USABLE_DROP_DB / 10);
  for (let k = 1; k < lines; k++) {
    if (gff[k] < floor) return { limitHz: frequencies[k], referenceLevel, reached: true };
  }
  return { limitHz: frequencies[lines - 1], referenceLevel, reached: false };
}

/**
 * Default block of the local baseline, seconds: long against a hammer pulse
 * (0.2 to 5 ms, common practice), short against a drift.
 */
export const DEFAULT_BASELINE_S = 0.05;

/** Samples at most kept per hit record for the quality plot (min/max pairs beyond). */
const RECORD_POINTS = 800;

/**
 * "6 hits: 4 accepted, 1 double, 1 overload", and "; 2 pulses below the
 * trigger" when pulses rose above the noise but not to the trigger.
 */
function summarise(hits: readonly Hit[], below: number): string {
  const counts = (["accepted", "double", "overload", "short"] as const)
    .map((status) => [status, hits.filter((h) => h.status === status).length] as const)
    .filter(([, count]) => count > 0)
    .map(([status, count]) => `${count} ${status}`);
  return `${hits.length} hit${hits.length === 1 ? "" : "s"}: ${counts.join(", ")}${
    below > 0 ? `; ${below} pulse${below === 1 ? "" : "s"} below the trigger` : ""
  }`;
}

/** Half-cosine-tapered force window of `length` samples in a record of `size`. */
function forceWindowSamples(size: number, length: number): Float64Array {
  const w = new Float64Array(size);
  const taper = Math.max(1, Math.floor(length / 4));
  const flat = length - taper;
  for (let i = 0; i < Math.min(size, length); i++) {
    w[i] = i < flat ? 1 : 0.5 * (1 + Math.cos(Math.PI * (i - flat + 1) / (taper + 1)));
  }
  return w;
}

/**
 * Averaged H1 over the accepted hits of a hammer test.
 *
 * @throws {QuiverError} when no hit is accepted or channels are unknown;
 * RangeError for impossible options.
 *
 * @example
 * ```ts
 * import { hammerFrf } from "./hammer.ts";
 * // Four half-sine hits on a force channel; the response is 0.5 × the force (a pure gain).
 * const rate = 4096, force = new Float64Array(4 * rate);
 * for (const at of [0.5, 1.5, 2.5, 3.5]) {
 *   for (let i = 0; i < 10; i++) force[Math.round(at * rate) + i] = 100 * Math.sin(Math.PI * (i + 0.5) / 10);
 * }
 * const r = await hammerFrf({ rate, startTime: 0, channels: [{ name: "hammer", unit: "N", data: force },
 *   { name: "tip", unit: "m/s^2", data: force.map((v) => 0.5 * v) }] }, { force: "hammer", outputs: ["tip"] });
 * const mag = r.table.columns.find((c) => c.name === "tip_mag")!.values;
 * if (r.table.metadata.averages !== 4 || Math.abs(mag[10] - 0.5) > 1e-9) throw new Error();
 * ```
 */
export async function hammerFrf(
  source: RecordingSource,
  options: HammerOptions,
): Promise<HammerResult> {
  if (options.outputs.length === 0) throw new RangeError("name at least one response channel");
  if (options.expTau !== undefined && options.expEnd !== undefined) {
    throw new RangeError(
      "give the exponential window by its time constant or by its end value, not both",
    );
  }
  if (options.expEnd !== undefined && !(options.expEnd > 0 && options.expEnd < 1)) {
    throw new RangeError(
      `the exponential window's end value must be in (0, 1), got ${options.expEnd}`,
    );
  }
  for (
    const [name, value] of [
      ["pretrigger", options.pretrigger],
      ["record", options.record],
      [
        "force window",
        options.forceWindow,
      ],
      ["exponential time constant", options.expTau],
      ["trigger", options.trigger],
      ["baseline", options.baseline],
      ["range", options.range],
    ] as const
  ) {
    if (value !== undefined && !(value > 0 && Number.isFinite(value))) {
      throw new RangeError(`${name} must be a positive number, got ${value}`);
    }
  }
  if (options.outputs.includes(options.force)) {
    throw new QuiverError(`"${options.force}" is both force and response`, {}, "usage");
  }
  const stream = asStream(source);
  const indices = channelIndices(stream.channels, [options.force, ...options.outputs]);
  const [force, ...outputs] = indices.map((i) => stream.channels[i]);
  // A recording in memory is used as it is; one read from a file is spooled once, so memory
  // stays flat however long the test ran (sample_series.ts).
  return await withChannelSeries(source, indices, (series, warnings) =>
    analyseHits(series, {
      rate: stream.rate,
      startTime: stream.startTime,
      force,
      outputs,
      signalWarnings: warnings.slice(1).flat(),
    }, options));
}

/** `x` rounded up to `digits` significant digits (a bound that, as printed, still holds). */
function ceilSignificant(x: number, digits: number): number {
  const step = 10 ** (Math.floor(Math.log10(x)) - digits + 1);
  return Math.ceil(x / step) * step;
}

/** The hammer analysis on the channels' series (force first). */
function analyseHits(
  series: readonly SampleSeries[],
  channelInfo: {
    rate: number;
    startTime: number;
    force: { name: string; unit: string };
    outputs: readonly { name: string; unit: string }[];
    signalWarnings: readonly string[];
  },
  options: HammerOptions,
): HammerResult {
  const { rate, startTime, force, outputs } = channelInfo;
  const pretriggerSamples = Math.round((options.pretrigger ?? 0.01) * rate);
  const detection = findHits(series[0], {
    pretriggerSamples,
    ...(options.record !== undefined ? { recordSamples: Math.round(options.record * rate) } : {}),
    ...(options.trigger !== undefined ? { trigger: options.trigger } : {}),
    ...(options.range !== undefined ? { range: options.range } : {}),
    baselineSamples: Math.max(16, Math.round((options.baseline ?? DEFAULT_BASELINE_S) * rate)),
  });
  const { hits, recordSamples } = detection;
  if (pretriggerSamples >= recordSamples) {
    throw new RangeError("the pre-trigger must be shorter than the record");
  }
  const accepted = hits.filter((h) => h.status === "accepted");
  const summary = summarise(hits, detection.belowTrigger.count);
  if (accepted.length === 0) {
    throw new QuiverError(`no accepted hit to average (${summary})`);
  }
  const pulses = accepted.map((h) => h.pulseSamples).sort((a, b) => a - b);
  const forceWindowLength = options.forceWindow !== undefined
    ? Math.round(options.forceWindow * rate)
    : pretriggerSamples + 4 * pulses[Math.floor(pulses.length / 2)];
  if (forceWindowLength > recordSamples) {
    throw new RangeError("the force window is longer than the record");
  }
  const tau = options.expTau ??
    (options.expEnd !== undefined ? -(recordSamples / rate) / Math.log(options.expEnd) : undefined);
  // A τ given too short for the record is refused before any averaging (see EXP_WINDOW_END_FLOOR).
  const shortestTau = (recordSamples / rate) / -Math.log(EXP_WINDOW_END_FLOOR);
  if (options.expTau !== undefined && options.expTau < shortestTau) {
    throw new QuiverError(
      `an exponential window of ${
        formatNumber(options.expTau, 3)
      } s is too short for the record of ${
        formatNumber(recordSamples / rate, 6)
      } s (${recordSamples} samples): it falls below ${EXP_WINDOW_END_FLOOR} at the record's end and adds damping 1/τ that swamps the structure's; the smallest τ quiver takes is the record / ln(1/${EXP_WINDOW_END_FLOOR}) = ${
        formatNumber(ceilSignificant(shortestTau, 4), 4)
      } s`,
      {},
      "usage",
    );
  }

  const forceWindow = forceWindowSamples(recordSamples, forceWindowLength);
  const exponential = new Float64Array(recordSamples).map((_, i) =>
    tau === undefined ? 1 : Math.exp(-i / (rate * tau))
  );
  const channels = [force, ...outputs];
  const accumulator = new SpectralAccumulator(series.length, {
    rate,
    block: recordSamples,
    overlap: 0,
    window: "rectangular",
    detrend: "none",
    pairs: outputs.map((_, i) => [0, i + 1] as const),
  });
  const baselineSamples = Math.max(1, Math.floor(pretriggerSamples / 2));
  const records = channels.map(() => new Float64Array(recordSamples));
  for (const hit of accepted) {
    const start = hit.sample - pretriggerSamples;
    series.forEach((channel, c) => {
      const record = records[c];
      channel.readInto(record, start);
      let offset = 0;
      for (let i = 0; i < baselineSamples; i++) offset += record[i];
      offset /= baselineSamples;
      for (let i = 0; i < recordSamples; i++) {
        record[i] = (record[i] - offset) * exponential[i] * (c === 0 ? forceWindow[i] : 1);
      }
    });
    accumulator.pushSegment(records);
  }
  const estimate = accumulator.finish();
  const usable = usableBandwidth(estimate.frequencies, estimate.auto[0]);
  const parts = frfTableParts(estimate, {
    input: force,
    outputs,
    estimator: "h1",
    form: options.form,
  });
  const warnings = [
    ...(accepted.length === 1 ? [SINGLE_AVERAGE_WARNING] : []),
    ...(usable.reached ? [] : [
      `the force autospectrum stays within ${USABLE_DROP_DB} dB of its low-frequency level up to ${
        formatNumber(estimate.frequencies[estimate.frequencies.length - 1], 6)
      } Hz: the hammer excites the whole band (or the force channel is noise)`,
    ]),
    ...channelInfo.signalWarnings,
    // Coherence low over the band: the response is not driven by this force (wrong channel,
    // a window that left nothing of the response, a loose sensor). The median, not the
    // largest: with few averages, noise alone tops 0.5 at some line of a thousand.
    ...parts.frf.channels.flatMap((c) => {
      if (c.coherence === undefined || c.coherence.length === 0) return [];
      const sorted = Float64Array.from(c.coherence).sort();
      const median = sorted[sorted.length >> 1];
      let below = 0;
      for (const v of c.coherence) if (v < LOW_COHERENCE) below++;
      return median < LOW_COHERENCE
        ? [
          `the coherence of "${c.name}" is below ${LOW_COHERENCE} at ${below} of ${c.coherence.length} lines (median ${
            formatNumber(median, 2)
          }): its FRF is not to be trusted (is the response driven by this force? is a window too short?)`,
        ]
        : [];
    }),
    ...(detection.belowTrigger.count > 0
      ? [
        `${detection.belowTrigger.count} pulse(s) on "${force.name}" rose above ${NOISE_SIGMAS} noise sigma (${
          formatNumber(NOISE_SIGMAS * detection.noiseSigma, 3)
        } ${force.unit}) but not to the trigger of ${
          formatNumber(detection.trigger, 3)
        } ${force.unit} (the largest ${
          formatNumber(detection.belowTrigger.largest, 3)
        } ${force.unit}): not counted as hits; lower the trigger to include them`,
      ]
      : []),
    ...hits.filter((h) => h.status !== "accepted").map((h) =>
      `hit ${h.hit} at ${
        (startTime + h.sample / rate).toFixed(4)
      } s left out: ${h.status} (${h.reason})`
    ),
  ];
  // The force autospectrum beside the FRFs (without the 0 Hz line when they dropped it).
  const forceColumn = {
    name: "force_autospectrum",
    unit: `${force.unit}^2/Hz`,
    values: estimate.auto[0].subarray(
      parts.frf.frequencies.length < estimate.frequencies.length ? 1 : 0,
    ),
  };
  const table: Table<HammerMetadata> = {
    columns: [...parts.columns, forceColumn],
    metadata: {
      analysis: "hammer",
      ...parts.metadata,
      usable_bandwidth_hz: usable.limitHz,
      usable_bandwidth_drop_db: USABLE_DROP_DB,
      usable_bandwidth_rule:
        `first line where the force autospectrum is ${USABLE_DROP_DB} dB below its mean over the lowest 2 % of the band (common practice: 10 to 20 dB)`,
      usable_bandwidth_reached: usable.reached,
      // The estimate's block is the record (rate and block as the accumulator was given them).
      ...segmentMetadata(estimate, ["rate_hz", "block", "df_hz", "averages"]),
      hits_summary: summary,
      hits_accepted: accepted.map((h) => h.hit),
      trigger_level: detection.trigger,
      trigger_rule: detection.triggerRule,
      force_baseline: detection.baseline,
      force_baseline_range: detection.baselineRange,
      force_baseline_block_s: detection.baselineSamples / rate,
      force_noise_sigma: detection.noiseSigma,
      pulses_below_trigger: detection.belowTrigger.count,
      pretrigger_s: pretriggerSamples / rate,
      record_s: recordSamples / rate,
      force_window_s: forceWindowLength / rate,
      exponential_window_tau_s: tau ?? null,
      warnings,
    },
  };
  const hitLog: Table<TableMetadata, Float64Array | readonly string[]> = {
    columns: [
      { name: "hit", unit: "", values: new Float64Array(hits.map((h) => h.hit)) },
      {
        name: "time_s",
        unit: "",
        values: new Float64Array(hits.map((h) => startTime + h.sample / rate)),
      },
      { name: "peak", unit: "", values: new Float64Array(hits.map((h) => h.peak)) },
      { name: "status", unit: "", values: hits.map((h) => h.status) },
    ],
    metadata: { analysis: "hammer hits", force: force.name, force_unit: force.unit, summary },
  };
  const frf: FrfData = { ...parts.frf, ...(tau !== undefined ? { expTau: tau } : {}) };
  const hitRecords = recordsOfHits(series, hits, {
    rate,
    pretriggerSamples,
    recordSamples,
    force,
    response: outputs[0],
  });
  return {
    frf,
    table,
    hitLog,
    hits,
    warnings,
    summary,
    triggerRule: detection.triggerRule,
    usableBandwidth: usable,
    hitRecords,
  };
}

/**
 * Every hit's record, force and first response as recorded (offset removed,
 * no windows), for the report's plot of each hit: time from the trigger,
 * then per hit `hit_N_force` and `hit_N_response`. Long records keep the
 * minimum and maximum of each stretch, so a short pulse is not lost.
 */
function recordsOfHits(
  series: readonly SampleSeries[],
  hits: readonly Hit[],
  context: {
    rate: number;
    pretriggerSamples: number;
    recordSamples: number;
    force: { name: string; unit: string };
    response: { name: string; unit: string };
  },
): Table<HammerRecordsMetadata> {
  const { rate, pretriggerSamples, recordSamples } = context;
  const stretches = Math.min(RECORD_POINTS / 2, recordSamples);
  const per = recordSamples / stretches;
  const points = recordSamples <= RECORD_POINTS ? recordSamples : 2 * stretches;
  const time = new Float64Array(points);
  for (let j = 0; j < points; j++) {
    const sample = recordSamples <= RECORD_POINTS ? j : Math.floor(Math.floor(j / 2) * per);
    time[j] = (sample - pretriggerSamples) / rate;
  }
  const record = new Float64Array(recordSamples);
  const reduce = (channel: SampleSeries, start: number): Float64Array => {
    const available = Math.min(recordSamples, channel.length - start);
    record.fill(NaN);
    channel.readInto(record.subarray(0, Math.max(0, available)), start);
    const out = new Float64Array(points);
    if (recordSamples <= RECORD_POINTS) {
      out.set(record);
      return out;
    }
    for (let s = 0; s < stretches; s++) {
      let lo = Infinity, hi = -Infinity;
      for (let i = Math.floor(s * per); i < Math.floor((s + 1) * per); i++) {
        if (record[i] < lo) lo = record[i];
        if (record[i] > hi) hi = record[i];
      }
      out[2 * s] = Number.isFinite(lo) ? lo : NaN;
      out[2 * s + 1] = Number.isFinite(hi) ? hi : NaN;
    }
    return out;
  };
  const columns: TableColumn[] = [{ name: "time_s", unit: "s", values: time }];
  for (const hit of hits) {
    const start = Math.max(0, hit.sample - pretriggerSamples);
    columns.push(
      { name: `hit_${hit.hit}_force`, unit: context.force.unit, values: reduce(series[0], start) },
      {
        name: `hit_${hit.hit}_response`,
        unit: context.response.unit,
        values: reduce(series[1], start),
      },
    );
  }
  return {
    columns,
    metadata: {
      analysis: "hammer_records",
      force: context.force,
      response: context.response,
      hits: hits.map((h) => ({ hit: h.hit, status: h.status, reason: h.reason ?? null })),
      reduction: recordSamples <= RECORD_POINTS
        ? "every sample"
        : `minimum and maximum of each of ${stretches} stretches of the record`,
    },
  };
}
