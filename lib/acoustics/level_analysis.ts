/**
 * Level against time with frequency and time weighting, and its summary:
 * the analysis behind the `level` command. Frequency weighting uses the
 * digital filter of weighting.ts, so A and C need a sample rate above
 * 2·f₄ ≈ 24.4 kHz. Levels are for engineering comparison; quiver is not a
 * certified sound level meter.
 *
 * @module
 */
import { type Recording, selectChannels } from "../io/recording.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { channelsWarnings } from "../io/signal_checks.ts";
import { filterCascade } from "./biquad.ts";
import { levelDb, levelReference, levelUnit } from "./levels.ts";
import {
  type LevelStatistics,
  levelStatistics,
  timeWeightedMeanSquare,
  type TimeWeighting,
} from "./time_weighting.ts";
import { type Weighting, weightingFilter, weightingFilterLimitHz } from "./weighting.ts";

/** Options of {@linkcode levelHistory}. */
export interface LevelOptions {
  /** Channels. Default: all. */
  channels?: readonly string[];
  /** Frequency weighting. Default `"A"`. */
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
  readonly table: Table;
  /** Warnings. */
  readonly warnings: readonly string[];
  /** Per-channel statistics. */
  readonly summary: readonly ({ channel: string; unit: string } & LevelStatistics)[];
}

/**
 * Frequency- and time-weighted levels of the chosen channels.
 *
 * @throws {RangeError} for a rate too low for the weighting filter or a bad step.
 */
export function levelHistory(recording: Recording, options: LevelOptions = {}): LevelResult {
  const weighting = options.weighting ?? "A";
  const timeWeighting = options.timeWeighting ?? "fast";
  const stepSeconds = options.step ?? 0.1;
  const step = Math.round(stepSeconds * recording.rate);
  if (step < 1) throw new RangeError(`the step of ${stepSeconds} s is shorter than one sample`);
  const channels = selectChannels(recording, options.channels);
  const sections = weightingFilter(weighting, recording.rate);
  const columns: TableColumn[] = [];
  const summary = channels.map((c) => {
    const reference = levelReference(c.unit, options.reference);
    const weighted = filterCascade(c.data, sections);
    const meanSquares = timeWeightedMeanSquare(weighted, recording.rate, timeWeighting, step);
    const levels = meanSquares.map((m) => levelDb(m, reference));
    const unit = levelUnit(weighting, reference, c.unit);
    columns.push({ name: c.name, unit, values: levels });
    let total = 0;
    for (let n = 0; n < weighted.length; n++) total += weighted[n] * weighted[n];
    return {
      channel: c.name,
      unit,
      ...levelStatistics(levelDb(total / weighted.length, reference), levels),
    };
  });
  const count = columns[0]?.values.length ?? 0;
  const time = new Float64Array(count).map((_, j) =>
    recording.startTime + ((j + 1) * step) / recording.rate
  );
  const warnings = channelsWarnings(channels);
  return {
    warnings,
    summary,
    table: {
      columns: [{ name: "time_s", unit: "", values: time }, ...columns],
      metadata: {
        analysis: "level",
        weighting,
        time_weighting: timeWeighting,
        step_s: step / recording.rate,
        rate_hz: recording.rate,
        weighting_filter_within_0_5_db_up_to_hz: weightingFilterLimitHz(weighting, recording.rate),
        summary: summary.map((s) => ({
          channel: s.channel,
          unit: s.unit,
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
