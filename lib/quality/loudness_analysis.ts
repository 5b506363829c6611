/**
 * Loudness (ISO 532-1:2017, Zwicker's method; stationary or time-varying)
 * and sharpness (DIN 45692:2009) of the sound pressure channels of a
 * recording: the analysis behind `quiver loudness`. Each channel is read
 * chunk by chunk once, memory flat in the record's length (the history, if
 * asked for, is one value per 2 ms).
 *
 * The numbers are for engineering comparison between vehicles, builds and
 * targets: quiver is not a certified sound level or loudness meter
 * ({@linkcode LOUDNESS_SAFETY_NOTE}).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { channelIndices } from "../io/recording.ts";
import type { ColumnValues, Table } from "../io/table.ts";
import { asStream, readChecked, type RecordingSource } from "../io/recording_stream.ts";
import { loudnessOfLevels, StationaryBandMeter } from "./loudness_stationary.ts";
import { TimeVaryingLoudnessMeter } from "./loudness_time_varying.ts";
import { bandsBeyond, raiseFactor } from "./loudness_bands.ts";
import { STEP_S } from "./loudness_envelope.ts";
import type { SoundField } from "./zwicker_core.ts";
import { BARK_COUNT, BARK_STEP } from "./zwicker_tables.ts";
import type { LoudnessMetadata } from "./loudness_metadata.ts";

/** What every loudness result, its help and README say of the numbers. */
export const LOUDNESS_SAFETY_NOTE =
  "Engineering comparison between vehicles, builds and targets: quiver is not a certified " +
  "sound level or loudness meter, and its tables of ISO 532-1 were typed from memory; for " +
  "noise exposure or compliance, defer to local regulations and licensed practice.";

/** The standards the result follows. */
export const LOUDNESS_STANDARD =
  "loudness: ISO 532-1:2017 (Zwicker's method); sharpness: DIN 45692:2009";

/** The methods of ISO 532-1 quiver offers. */
export const LOUDNESS_METHODS = ["stationary", "time-varying"] as const;

/** One of {@linkcode LOUDNESS_METHODS}. */
export type LoudnessMethod = typeof LOUDNESS_METHODS[number];

/** Options of {@linkcode loudnessAnalysis}. */
export interface LoudnessOptions {
  /** Channels. Default: every channel in Pa. */
  readonly channels?: readonly string[];
  /** Sound field. Default: "free". */
  readonly field?: SoundField;
  /** Method. Default: "stationary". */
  readonly method?: LoudnessMethod;
  /** Keep N and sharpness against time (time-varying only). Default: false. */
  readonly history?: boolean;
}

/** The result table, the specific loudness and history tables, and warnings. */
export interface LoudnessResult {
  readonly table: Table<LoudnessMetadata, ColumnValues>;
  /** Specific loudness against critical-band rate, tidy: channel, z, N′ (time-averaged when time-varying). */
  readonly specific: Table<Record<string, unknown>, ColumnValues>;
  /** N and sharpness every 2 ms (time-varying with `history`), else undefined. */
  readonly history?: Table<Record<string, unknown>>;
  readonly warnings: readonly string[];
}

const finite = (v: number | undefined) => (v !== undefined && Number.isFinite(v) ? v : null);

/**
 * Loudness and sharpness of the chosen sound pressure channels.
 *
 * @throws {QuiverError} (data) when no channel is in Pa or a chosen one is not.
 *
 * @example
 * ```ts
 * import { loudnessAnalysis } from "./loudness_analysis.ts";
 * // 1 kHz at 40 dB SPL for 2 s: about 1 sone, 40 phon (ISO 532-1 definition).
 * const a = Math.SQRT2 * 20e-6 * 100;
 * const data = new Float64Array(96000).map((_, i) => a * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const r = await loudnessAnalysis({ rate: 48000, startTime: 0, channels: [{ name: "mic", unit: "Pa", data }] });
 * const row = r.table.metadata.rows[0];
 * if (Math.abs(row.loudness! - 1) > 0.07 || Math.abs(row.loudness_level! - 40) > 1) throw new Error();
 * ```
 */
export async function loudnessAnalysis(
  source: RecordingSource,
  options: LoudnessOptions = {},
): Promise<LoudnessResult> {
  const stream = asStream(source);
  const field = options.field ?? "free";
  const method = options.method ?? "stationary";
  const indices = options.channels === undefined
    ? stream.channels.flatMap((c, i) => (c.unit === "Pa" ? [i] : []))
    : channelIndices(stream.channels, options.channels);
  if (indices.length === 0) {
    throw new QuiverError("the recording has no channel in Pa: loudness needs sound pressure");
  }
  for (const i of indices) {
    const c = stream.channels[i];
    if (c.unit !== "Pa") {
      throw new QuiverError(
        `channel "${c.name}" is in ${c.unit === "" ? "no unit" : c.unit}, not Pa: ` +
          `loudness needs sound pressure (give its unit in the set-up)`,
      );
    }
  }
  const { rate } = stream;
  const names = indices.map((i) => stream.channels[i].name);
  const rows: LoudnessMetadata["rows"][number][] = [];
  const specifics: Float64Array[] = [];
  let history: Table<Record<string, unknown>> | undefined;
  const warnings: string[] = [];
  if (method === "stationary") {
    const meters = indices.map(() => new StationaryBandMeter(rate, stream.length));
    warnings.push(
      ...await readChecked(stream, indices, (chunk) => chunk.forEach((c, i) => meters[i].push(c))),
    );
    meters.forEach((m, i) => {
      const { levels, shortRecord } = m.finish();
      if (i === 0 && shortRecord.length > 0) {
        warnings.push(
          `the bands of ${shortRecord.join(", ")} Hz spent over half the record settling: ` +
            `their levels are unreliable`,
        );
      }
      const v = loudnessOfLevels(levels.map((l) => (Number.isNaN(l) ? -Infinity : l)), field);
      rows.push({
        channel: names[i],
        loudness: finite(v.loudness),
        loudness_level: finite(v.loudnessLevel),
        sharpness: finite(v.sharpness),
        n5: null,
        n10: null,
      });
      specifics.push(v.specific);
    });
  } else {
    const keep = options.history ?? false;
    const meters = indices.map(() => new TimeVaryingLoudnessMeter(rate, { field, history: keep }));
    warnings.push(
      ...await readChecked(stream, indices, (chunk) => chunk.forEach((c, i) => meters[i].push(c))),
    );
    const values = meters.map((m) => m.finish());
    values.forEach((v, i) => {
      rows.push({
        channel: names[i],
        loudness: finite(v.loudness),
        loudness_level: finite(v.loudnessLevel),
        sharpness: finite(v.sharpness),
        n5: finite(v.n5),
        n10: finite(v.n10),
      });
      specifics.push(v.specific);
    });
    if (values[0].steps === 0) warnings.push("the record is shorter than one 2-ms step");
    if (keep) {
      const steps = values[0].steps;
      history = {
        columns: [
          {
            name: "time_s",
            unit: "s",
            values: new Float64Array(steps).map((_, k) => stream.startTime + (k + 1) * STEP_S),
          },
          ...values.flatMap((v, i) => [
            { name: names[i], unit: "sone", values: v.history! },
            { name: `${names[i]}:sharpness`, unit: "acum", values: v.sharpnessHistory! },
          ]),
        ],
        metadata: { analysis: "loudness_history", step_s: STEP_S, field },
      };
    }
  }
  const beyond = bandsBeyond(rate);
  if (beyond.length > 0) {
    warnings.push(
      `the bands of ${beyond.join(", ")} Hz reach above the recording's Nyquist frequency ` +
        `(${rate / 2} Hz): they hold only what lies below it`,
    );
  }
  const z = Float64Array.from({ length: BARK_COUNT }, (_, k) => (k + 0.5) * BARK_STEP);
  const specific: Table<Record<string, unknown>, ColumnValues> = {
    columns: [
      {
        name: "channel",
        unit: "",
        values: names.flatMap((n) => Array.from({ length: BARK_COUNT }, () => n)),
      },
      { name: "z", unit: "Bark", values: Float64Array.from(names.flatMap(() => Array.from(z))) },
      {
        name: "specific_loudness",
        unit: "sone/Bark",
        values: Float64Array.from(specifics.flatMap((s) => Array.from(s))),
      },
    ],
    metadata: { analysis: "specific_loudness", method, field },
  };
  const numbers = (key: "loudness" | "loudness_level" | "sharpness" | "n5" | "n10") =>
    Float64Array.from(rows, (r) => r[key] ?? NaN);
  return {
    warnings,
    specific,
    ...(history === undefined ? {} : { history }),
    table: {
      columns: [
        { name: "channel", unit: "", values: names },
        { name: "loudness", unit: "sone", values: numbers("loudness") },
        { name: "loudness_level", unit: "phon", values: numbers("loudness_level") },
        { name: "sharpness", unit: "acum", values: numbers("sharpness") },
        ...(method === "time-varying"
          ? [
            { name: "n5", unit: "sone", values: numbers("n5") },
            { name: "n10", unit: "sone", values: numbers("n10") },
          ]
          : []),
      ],
      metadata: {
        analysis: "loudness",
        method,
        field,
        rate_hz: rate,
        method_rate_hz: rate * raiseFactor(rate),
        duration_s: stream.length / rate,
        bands_beyond_recording_hz: beyond,
        standard: LOUDNESS_STANDARD,
        safety: LOUDNESS_SAFETY_NOTE,
        rows,
        warnings,
      },
    },
  };
}
