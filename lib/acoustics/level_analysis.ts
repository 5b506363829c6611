/**
 * Level against time with frequency and time weighting, and its summary:
 * the analysis behind the `level` command. Frequency weighting uses the
 * digital filter of weighting.ts, so A and C need a sample rate above
 * 2·f₄ ≈ 24.4 kHz. Levels are for engineering comparison; quiver is not a
 * certified sound level meter.
 *
 * The frequency weighting, unless the caller names one, follows each
 * channel's unit: A for a sound pressure (Pa), whose A-weighted level is what
 * an ear-related comparison wants, and Z (none) for anything else, since A
 * is defined for hearing (IEC 61672-1) and would strip an accelerometer's low
 * frequencies. Each summary entry says which and why.
 *
 * Fast and Slow start from rest (IEC 61672-1); Lmax and Leq count from the
 * first sample, Lmin and L10/L50/L90 once the meter has settled (5 time
 * constants, see time_weighting.ts).
 *
 * @module
 */
import { channelIndices } from "../io/recording.ts";
import type { Table, TableColumn } from "../io/table.ts";
import type { LevelMetadata } from "./level_metadata.ts";
import { asStream, readChecked, type RecordingSource } from "../io/recording_stream.ts";
import { CascadeFilter } from "./biquad.ts";
import { levelDb, levelReference, levelUnit } from "./levels.ts";
import {
  type LevelStatistics,
  levelStatistics,
  SETTLING_TIME_CONSTANTS,
  settlingSeconds,
  TimeWeightedMeter,
  type TimeWeighting,
} from "./time_weighting.ts";
import { minOf } from "../extent.ts";
import { type Weighting, weightingFilter, weightingFilterLimitHz } from "./weighting.ts";
import { formatNumber } from "../format_number.ts";

/** Options of {@linkcode levelHistory}. */
export interface LevelOptions {
  /** Channels. Default: all. */
  channels?: readonly string[];
  /**
   * Frequency weighting of every channel. Default: per channel from its unit
   * ({@linkcode defaultWeighting}: A for Pa, Z otherwise).
   */
  weighting?: Weighting;
  /** Time weighting. Default `"fast"`. */
  timeWeighting?: TimeWeighting;
  /** Seconds between readings. Default 0.1 s. */
  step?: number;
  /** Level reference; default from the unit (ISO 1683). */
  reference?: number;
}

/** Levels against time and their statistics. */
export interface LevelResult {
  /** time_s, then one dB column per channel. */
  readonly table: Table<LevelMetadata>;
  /** Warnings. */
  readonly warnings: readonly string[];
  /** Per-channel statistics. */
  readonly summary: readonly LevelSummary[];
}

/** One channel's statistics, with the weighting it got and why. */
export type LevelSummary = {
  channel: string;
  /** The level's unit, e.g. `dB(A) re 20 µPa`. */
  unit: string;
  /** The frequency weighting applied. */
  weighting: Weighting;
  /** `option` when the caller named it, `unit` when the channel's unit chose it. */
  weightingFrom: "option" | "unit";
} & LevelStatistics;

/**
 * The frequency weighting a channel gets when none is named: A for a sound
 * pressure in Pa, Z (no weighting) for any other unit.
 *
 * @example
 * ```ts
 * import { defaultWeighting } from "./level_analysis.ts";
 * if (defaultWeighting("Pa") !== "A" || defaultWeighting("m/s^2") !== "Z" || defaultWeighting("") !== "Z") throw new Error();
 * ```
 */
export function defaultWeighting(unit: string): Weighting {
  return unit === "Pa" ? "A" : "Z";
}

/** The weighting of each channel and whether the caller or the unit chose it. */
function weightingsOf(
  channels: readonly { unit: string }[],
  options: LevelOptions,
): { weighting: Weighting; from: "option" | "unit" }[] {
  return channels.map((c) =>
    options.weighting !== undefined
      ? { weighting: options.weighting, from: "option" }
      : { weighting: defaultWeighting(c.unit), from: "unit" }
  );
}

/**
 * Frequency- and time-weighted levels of the chosen channels.
 *
 * @throws {RangeError} for a rate too low for the weighting filter or a bad step.
 *
 * @example
 * ```ts
 * import { levelHistory } from "./level_analysis.ts";
 * // 1 Pa rms at 250 Hz, Z-weighted, Leq per 0.5 s: 93.98 dB re 20 µPa (ISO 1683).
 * const data = new Float64Array(8000 * 2).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 250 * i / 8000));
 * const { summary } = await levelHistory({ rate: 8000, startTime: 0, channels: [{ name: "mic", unit: "Pa", data }] },
 *   { weighting: "Z", timeWeighting: "none", step: 0.5 });
 * if (Math.abs(summary[0].leq - 93.98) > 0.01) throw new Error();
 * ```
 */
export async function levelHistory(
  source: RecordingSource,
  options: LevelOptions = {},
): Promise<LevelResult> {
  const stream = asStream(source);
  const indices = channelIndices(stream.channels, options.channels);
  const channels = indices.map((i) => stream.channels[i]);
  const meters = levelMeters(channels, stream.rate, options);
  // The chunks are the reader's reused buffers: filtering them in place copies nothing.
  const warnings = await readChecked(
    stream,
    indices,
    (chunk) => chunk.forEach((c, i) => meters[i].push(c)),
  );
  return levelResult({
    channels,
    rate: stream.rate,
    startTime: stream.startTime,
    options,
    meters,
    warnings,
  });
}

/** A weighting filter and a time-weighted meter for one channel. */
interface ChannelMeter {
  push(x: Float64Array): void;
  finish(): {
    readings: Float64Array;
    meanSquare: number;
    highest: number;
    lowest: number;
    settledFrom: number;
  };
}

function levelMeters(
  channels: readonly { name: string; unit: string }[],
  rate: number,
  options: LevelOptions,
): ChannelMeter[] {
  const stepSeconds = options.step ?? 0.1;
  const step = Math.round(stepSeconds * rate);
  if (step < 1) throw new RangeError(`the step of ${stepSeconds} s is shorter than one sample`);
  const weightings = weightingsOf(channels, options);
  const sections = new Map(
    weightings.map(({ weighting }) => [weighting, weightingFilter(weighting, rate)]),
  );
  for (const c of channels) levelReference(c.unit, options.reference); // refuse before the work
  return weightings.map(({ weighting }) => {
    const filter = new CascadeFilter(sections.get(weighting)!);
    const meter = new TimeWeightedMeter(rate, options.timeWeighting ?? "fast", step);
    return { push: (x) => meter.push(filter.process(x)), finish: () => meter.finish() };
  });
}

function levelResult(
  { channels, rate, startTime, options, meters, warnings }: {
    channels: readonly { name: string; unit: string }[];
    rate: number;
    startTime: number;
    options: LevelOptions;
    meters: readonly ChannelMeter[];
    warnings: string[];
  },
): LevelResult {
  const weightings = weightingsOf(channels, options);
  const distinct = [...new Set(weightings.map((w) => w.weighting))];
  const timeWeighting = options.timeWeighting ?? "fast";
  const step = Math.round((options.step ?? 0.1) * rate);
  const columns: TableColumn[] = [];
  const settling = settlingSeconds(timeWeighting);
  let unsettled = false;
  const summary = channels.map((c, i): LevelSummary => {
    const { weighting, from } = weightings[i];
    const reference = levelReference(c.unit, options.reference);
    const { readings, meanSquare, highest, lowest, settledFrom } = meters[i].finish();
    const levels = readings.map((m) => levelDb(m, reference));
    const unit = levelUnit(weighting, reference, c.unit);
    columns.push({ name: c.name, unit, values: levels });
    // Lmin and the exceedance levels from the settled part; a record too short to settle
    // gives them from every reading, and says so.
    const settled = settledFrom < levels.length && lowest < Infinity;
    if (!settled) unsettled = true;
    const counted = settled ? levels.subarray(settledFrom) : levels;
    const extremes = {
      lmax: levelDb(highest, reference),
      lmin: settled ? levelDb(lowest, reference) : minOf(levels),
    };
    return {
      channel: c.name,
      unit,
      weighting,
      weightingFrom: from,
      ...levelStatistics(levelDb(meanSquare, reference), counted, extremes),
    };
  });
  if (unsettled) {
    warnings.push(
      `the record is shorter than the meter's settling time of ${formatNumber(settling)} s ` +
        `(${SETTLING_TIME_CONSTANTS} time constants from rest): Lmin, L10, L50 and L90 ` +
        `include the rise from rest and read low`,
    );
  }
  const count = columns[0]?.values.length ?? 0;
  const time = new Float64Array(count).map((_, j) => startTime + ((j + 1) * step) / rate);
  return {
    warnings,
    summary,
    table: {
      columns: [{ name: "time_s", unit: "", values: time }, ...columns],
      metadata: {
        analysis: "level",
        // One weighting for all channels, or "per channel" (each summary entry has its own).
        weighting: distinct.length === 1 ? distinct[0] : "per channel",
        weighting_from: options.weighting !== undefined
          ? "option"
          : "channel unit (A for Pa, Z otherwise)",
        time_weighting: timeWeighting,
        step_s: step / rate,
        // Lmin and L10/L50/L90 count from here (Lmax and Leq from the first sample).
        statistics_settling_s: settling,
        rate_hz: rate,
        weighting_filter_within_0_5_db_up_to_hz: minOf(
          new Float64Array(weightings.map((w) => weightingFilterLimitHz(w.weighting, rate))),
        ),
        summary: summary.map((s) => ({
          channel: s.channel,
          unit: s.unit,
          weighting: s.weighting,
          leq_db: s.leq,
          lmax_db: s.lmax,
          lmin_db: s.lmin,
          l10_db: s.l10,
          l50_db: s.l50,
          l90_db: s.l90,
        })),
        warnings,
        note: "engineering comparison only; not a certified sound level meter measurement",
      },
    },
  };
}
