/**
 * Tacho pulses: found by a Schmitt trigger that follows the pulses
 * (tacho_trigger.ts), then cleaned: extra pulses dropped, gaps filled up to
 * a limit, missing-tooth wheels recognised, silences named (tacho_repair.ts).
 * A stretch at the record's ends where no pulse was found is named too.
 * The shaft's speed and angle follow from the pulses (shaft_motion.ts).
 *
 * @module
 */
import { minOf } from "../extent.ts";
import { QuiverError } from "../errors.ts";
import { memorySeries, type SampleSeries } from "../io/sample_series.ts";
import { dropExtraPulses, localMedians, mendPulses, REPAIR_LIMIT } from "./tacho_repair.ts";
import { readPulses } from "./tacho_trigger.ts";

/** Options of {@linkcode tachoPulses}. */
export interface TachoOptions {
  /**
   * Pulses per revolution; with `missingTeeth`, the tooth positions of the
   * full wheel (60 for a 60-2 wheel, which gives 58 pulses). Required.
   */
  ppr: number;
  /** Teeth missing from the wheel, in one gap per revolution. Default 0. */
  missingTeeth?: number;
  /** Switching level, fixed. Default: following the pulses (see the module). */
  level?: number;
  /** Hysteresis (full width), fixed. Default: following the pulses (see the module). */
  hysteresis?: number;
}

/** Cleaned pulse times and what was repaired or recognised. */
export interface TachoPulses {
  /** Pulse times, s from the first sample, strictly increasing. */
  readonly times: Float64Array;
  /** The shaft angle at each pulse, revolutions (j/ppr, or the tooth's angle on a missing-tooth wheel). */
  readonly angles: Float64Array;
  /** Pulses inserted into gaps. */
  readonly inserted: number;
  /** Extra pulses removed. */
  readonly removed: number;
  /** Switching level: the fixed one, or undefined when it followed the pulses. */
  readonly level: number | undefined;
  /** Hysteresis: the fixed one, or the least (the floor) when it followed the pulses. */
  readonly hysteresis: number;
  /**
   * Stretches (s from the first sample) where no pulse was found: at the record's ends, and
   * within it where no pulse came for more than `FILL_MOST` (tacho_repair.ts) + 1 local intervals
   * (never filled in: the angle is counted across from the speed either side).
   */
  readonly silent: readonly (readonly [number, number])[];
  /**
   * Which crossings time the pulses: "rising", or "falling" for a bipolar (inductive) pulse,
   * timed at the crossing between its lobes (see `STEEPNESS_RATIO`, tacho_trigger.ts).
   */
  readonly edge: "rising" | "falling";
  /** Stretches (s) between the pulses that bound each filled gap. */
  readonly filled: readonly (readonly [number, number])[];
  /** Missing-tooth gaps recognised (one per revolution). */
  readonly references: number;
  /** Gap-sized intervals where no revolution ends (teeth lost there; not taken as the mark). */
  readonly mismatched: number;
  /**
   * Without `missingTeeth`: filled gaps that look like a missing-tooth wheel
   * (the same number of pulses filled, at the same spacing, at least 3 times).
   */
  readonly wheelHint?: { readonly teeth: number; readonly missing: number };
}

/**
 * Finds and cleans the tacho pulses.
 *
 * @throws {QuiverError} when fewer than 3 pulses are found, or more than
 * {@linkcode REPAIR_LIMIT} of them need repair; RangeError for
 * missing teeth that leave fewer than 2 teeth.
 *
 * @example
 * ```ts
 * import { tachoPulses } from "./tacho.ts";
 * // 10 Hz square wave at 1 kHz: pulses 0.1 s apart.
 * const x = new Float64Array(1000).map((_, i) => (Math.floor(i / 50) % 2 === 0 ? 0 : 5));
 * const p = tachoPulses(x, 1000, { ppr: 1 });
 * if (p.times.length !== 10 || Math.abs(p.times[1] - p.times[0] - 0.1) > 1e-9) throw new Error();
 * ```
 */
export function tachoPulses(
  signal: Float64Array | SampleSeries,
  rate: number,
  options: TachoOptions,
): TachoPulses {
  const series = signal instanceof Float64Array ? memorySeries(signal) : signal;
  const missingTeeth = options.missingTeeth ?? 0;
  if (
    !Number.isInteger(missingTeeth) || missingTeeth < 0 ||
    (missingTeeth > 0 && options.ppr - missingTeeth < 2)
  ) {
    throw new RangeError(
      `missing teeth must be a whole number from 0 that leaves at least 2 of the ${options.ppr} teeth, got ${missingTeeth}`,
    );
  }
  const { raw, edge, fixed, level, hysteresis, floor } = readPulses(series, rate, options);
  const { times, removed } = dropExtraPulses(raw);
  const intervals = times.slice(1).map((t, i) => t - times[i]);
  const medians = localMedians(intervals);
  const shortest = minOf(medians);
  if (shortest * rate < 3) {
    throw new QuiverError(
      `tacho pulses come only ${
        (shortest * rate).toFixed(1)
      } samples apart: the sample rate is too low for this tacho (fewer pulses per revolution, or record faster)`,
    );
  }
  const { silences, ...mended } = mendPulses(times, intervals, medians, options.ppr, missingTeeth);
  const span = series.length / rate;
  // A stretch at an end longer than 2 of the nearest local median intervals held no pulse
  // (missingTeeth + 2 on a missing-tooth wheel: a record may end inside the wheel's gap).
  const allowed = missingTeeth + 2;
  const silent: [number, number][] = [];
  if (times[0] > allowed * medians[0]) silent.push([0, times[0]]);
  silent.push(...silences);
  const last = times[times.length - 1];
  if (span - last > allowed * medians[medians.length - 1]) silent.push([last, span]);
  // Repair on this scale means the trigger misreads the pulses (or --ppr is wrong): the
  // speed would be invented, so it is refused rather than written.
  const repaired = mended.inserted + removed;
  if (repaired > REPAIR_LIMIT * raw.length) {
    const hint = mended.wheelHint === undefined
      ? ""
      : ` The pulses look like a missing-tooth wheel (${mended.wheelHint.teeth}-${mended.wheelHint.missing}): give --ppr ${mended.wheelHint.teeth} --missing-teeth ${mended.wheelHint.missing}.`;
    throw new QuiverError(
      `the tacho pulses cannot be trusted: of ${raw.length} pulses found, ${mended.inserted} had to be filled in and ${removed} removed (${
        (100 * repaired / raw.length).toFixed(1)
      } %, more than ${100 * REPAIR_LIMIT} %), so the speed would be invented; ` +
        `look at the tacho channel and set the trigger (--tacho-level, --tacho-hysteresis), and check the pulses per revolution (--ppr, --missing-teeth).${hint}`,
    );
  }
  return {
    ...mended,
    edge,
    removed,
    level: fixed ? level : undefined,
    hysteresis: fixed ? hysteresis : floor,
    silent,
  };
}
