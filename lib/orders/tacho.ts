/**
 * Shaft speed and angle from a tachometer channel.
 *
 * Pulses: a Schmitt trigger whose level and hysteresis follow the pulses'
 * own amplitude, so that an inductive tacho (amplitude proportional to
 * speed, ten times weaker at the start of a run-up than at its end) is read
 * from its first pulse, as a TTL tacho is. An envelope holds the signal's
 * recent highest and lowest values: each follows the signal at once outward,
 * is held for {@linkcode ENVELOPE_HOLD_INTERVALS} pulse intervals after the
 * signal last came near it, and then relaxes towards the signal with a time
 * constant of {@linkcode ENVELOPE_RELEASE_INTERVALS} intervals (the latest
 * interval; before the second pulse it only holds). The switching level is the
 * envelope's midpoint and the hysteresis {@linkcode HYSTERESIS_FRACTION} of
 * its width, but never less than {@linkcode HYSTERESIS_FLOOR} of the
 * record's range: noise below that, as in a stretch where the tacho is
 * silent, gives no pulses. A level or hysteresis given by the caller makes
 * the trigger fixed (the other one from the percentiles: the midpoint of the
 * 2nd and 98th, and 20 % of their span). Each pulse's time is the sub-sample
 * instant, by linear interpolation, where the signal last crossed the level
 * on its way up. A bipolar tacho, one that rests mid-way between its
 * extremes ({@linkcode BIPOLAR_REST}), is also read upside down, and its
 * falling crossings time the pulses when they are much the steeper
 * ({@linkcode STEEPNESS_RATIO}): an inductive pickup's pulse, a positive lobe
 * then a negative one, is timed at the zero crossing between its lobes
 * (common practice), not by noise at rest before its first lobe.
 *
 * Cleaning: an interval more than 1.5 times the local median (of the 11
 * around it) is a gap of n ≈ interval/median pulses, filled evenly when n is
 * at most {@linkcode FILL_MOST} + 1; a longer gap is a silence of the tacho,
 * named and never filled (the angle is counted across it from the pulse rate
 * either side). One shorter than half the median comes from an extra pulse,
 * which is dropped. More repair than {@linkcode REPAIR_LIMIT} of the pulses
 * found (filled plus dropped) is refused.
 * A missing-tooth wheel (`missingTeeth` > 0, `ppr` the tooth positions of the
 * full wheel, e.g. 60 for a 60-2 wheel) is never mended: an interval of about
 * missingTeeth + 1 local medians is its gap, the once-per-revolution
 * reference, and each pulse gets its tooth's angle. Where no pulse was found
 * at the record's ends (for longer than missingTeeth + 2 local intervals:
 * a record may end inside the wheel's gap), or pulses were filled in, the
 * stretches are named.
 *
 * Speed: pulse times are smoothed by a local quadratic fit of angle against
 * time (see {@linkcode motionFromPulses}), the speed read from the fit, and
 * the angle θ(t) interpolated between the smoothed pulses by a monotone
 * cubic (Fritsch–Carlson 1980).
 *
 * @module
 */
import { minOf } from "../extent.ts";
import { QuiverError } from "../errors.ts";
import { kthSmallestOfMany, memorySeries, type SampleSeries } from "../io/sample_series.ts";

/**
 * The envelope's release time constant in pulse intervals: long enough that
 * the envelope keeps most of the last peak through a missing tooth's gap
 * (after the hold, e^(−1/3) = 72 % at the end of a 60-2 wheel's low phase),
 * short enough to follow a run-up's amplitude (common practice for peak
 * detectors: a few periods).
 *
 * @example
 * ```ts
 * import { ENVELOPE_RELEASE_INTERVALS } from "./tacho.ts";
 * if (ENVELOPE_RELEASE_INTERVALS !== 3) throw new Error();
 * ```
 */
export const ENVELOPE_RELEASE_INTERVALS = 3;

/**
 * Pulse intervals for which each side of the envelope is held after the
 * signal last came near it, before it relaxes: a cycle and a half, so that
 * a steady tacho refreshes it every cycle and is read at its exact midpoint.
 *
 * @example
 * ```ts
 * import { ENVELOPE_HOLD_INTERVALS } from "./tacho.ts";
 * if (ENVELOPE_HOLD_INTERVALS !== 1.5) throw new Error();
 * ```
 */
export const ENVELOPE_HOLD_INTERVALS = 1.5;

/**
 * The hysteresis as a fraction of the envelope's width (of the 2nd–98th
 * percentile span for a fixed trigger).
 *
 * @example
 * ```ts
 * import { HYSTERESIS_FRACTION } from "./tacho.ts";
 * if (HYSTERESIS_FRACTION !== 0.2) throw new Error();
 * ```
 */
export const HYSTERESIS_FRACTION = 0.2;

/**
 * The least hysteresis, as a fraction of the record's range (least to most
 * sample): pulses down to about this fraction
 * of the strongest are read (a 25:1 amplitude range, so an inductive
 * pickup's 10:1 run-up with room), and noise of up to about a tenth of it
 * RMS is not, also through a silence of the tacho within the record (rule
 * ours; at 1 %, 2 mV of noise on a 0.55 V inductive pulse set off a pulse
 * every few ms through a silence).
 *
 * @example
 * ```ts
 * import { HYSTERESIS_FLOOR } from "./tacho.ts";
 * if (HYSTERESIS_FLOOR !== 0.04) throw new Error();
 * ```
 */
export const HYSTERESIS_FLOOR = 0.04;

/**
 * The pulses are timed on the signal's falling crossings when its rising crossings of the
 * level are less than this share as steep (the sample step across the crossing over the
 * hysteresis, medians over the pulses), else on its rising crossings. A bipolar inductive
 * pulse falls steepest between its lobes, which is its timing point (common practice), and
 * rises into its first lobe from rest slowly (about a fifth as steep, and by noise when it
 * rests at the level); a TTL or sine tacho is as steep both ways and keeps its rising edges.
 *
 * @example
 * ```ts
 * import { STEEPNESS_RATIO } from "./tacho.ts";
 * if (STEEPNESS_RATIO !== 0.5) throw new Error();
 * ```
 */
export const STEEPNESS_RATIO = 0.5;

/**
 * The most pulses filled into one gap: 2 (an interval of up to 3.5 local intervals). A longer
 * gap is a silence of the tacho, named, and never filled with invented pulses.
 *
 * @example
 * ```ts
 * import { FILL_MOST } from "./tacho.ts";
 * if (FILL_MOST !== 2) throw new Error();
 * ```
 */
export const FILL_MOST = 2;

/**
 * The largest share of the pulses found that may be repaired (filled in plus removed): 5 %
 * (rule ours). A tacho read well needs an odd repair; beyond this the trigger is misreading
 * the pulses, or `ppr` is wrong, and the tacho is refused.
 *
 * @example
 * ```ts
 * import { REPAIR_LIMIT } from "./tacho.ts";
 * if (REPAIR_LIMIT !== 0.05) throw new Error();
 * ```
 */
export const REPAIR_LIMIT = 0.05;

/**
 * A tacho is taken as bipolar, and may be timed on its falling crossings (see
 * {@linkcode STEEPNESS_RATIO}), only when its median sample lies within this share of the
 * 2nd–98th percentile span (of the range, for narrow pulses) from their midpoint: an inductive
 * pickup rests at zero between its positive and negative lobes, a TTL tacho on a rail.
 *
 * @example
 * ```ts
 * import { BIPOLAR_REST } from "./tacho.ts";
 * if (BIPOLAR_REST !== 0.2) throw new Error();
 * ```
 */
export const BIPOLAR_REST = 0.2;

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
   * within it where no pulse came for more than {@linkcode FILL_MOST} + 1 local intervals
   * (never filled in: the angle is counted across from the speed either side).
   */
  readonly silent: readonly (readonly [number, number])[];
  /**
   * Which crossings time the pulses: "rising", or "falling" for a bipolar (inductive) pulse,
   * timed at the crossing between its lobes (see {@linkcode STEEPNESS_RATIO}).
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
 * When the 2nd–98th percentile span is below this share of the whole range,
 * the pulses fill less than 2 % of the record and the range is taken
 * instead (rule ours).
 */
const NARROW_SHARE = 0.1;

/** The samples at the given percentiles (nearest rank), in one set of passes. */
function percentiles(series: SampleSeries, ps: readonly number[]): number[] {
  const n = series.length;
  const rank = (p: number) => Math.min(n - 1, Math.max(0, Math.round((p / 100) * (n - 1))));
  return kthSmallestOfMany(series, ps.map(rank));
}

/** Intervals either side in a local median. */
const MEDIAN_HALF = 5;

/**
 * The median of values[i − 5 … i + 5] (fewer at the ends; the upper middle
 * of an even count), sorted by insertion in `scratch` (11 values or more):
 * called for every pulse interval, it allocates nothing.
 */
function localMedian(values: readonly number[], i: number, scratch: Float64Array): number {
  const from = Math.max(0, i - MEDIAN_HALF);
  const count = Math.min(values.length, i + MEDIAN_HALF + 1) - from;
  for (let k = 0; k < count; k++) {
    const v = values[from + k];
    let p = k;
    for (; p > 0 && scratch[p - 1] > v; p--) scratch[p] = scratch[p - 1];
    scratch[p] = v;
  }
  return scratch[count >> 1];
}

/**
 * The raw pulse times of a Schmitt trigger over the record, fixed or
 * following the envelope (see the module).
 */
function triggerPulses(
  series: SampleSeries,
  rate: number,
  trigger: { fixed: boolean; level: number; hysteresis: number; floor: number; sign: 1 | -1 },
): { raw: number[]; steepness: number } {
  const raw: number[] = [];
  const steps: number[] = [];
  const { fixed, floor, sign } = trigger;
  let crossStep = NaN;
  let armed = false;
  let lastCross = NaN;
  let previous = NaN;
  let hi = NaN, lo = NaN, release = 1, hold = Infinity, hiAt = 0, loAt = 0;
  // A Schmitt trigger over the record chunk by chunk; `previous` and the envelope carry
  // across. The state is copied into locals for each chunk's loop (captured variables cost
  // more per sample than the comparisons) and stored back after it.
  series.scan((chunk, offset) => {
    let isArmed = armed, cross = lastCross, before = previous;
    let top = hi, bottom = lo, r = release, held = hold, topAt = hiAt, bottomAt = loAt;
    let level = trigger.level, upper = level + trigger.hysteresis / 2;
    let lower = level - trigger.hysteresis / 2;
    for (let j = 0; j < chunk.length; j++) {
      const i = offset + j;
      const value = sign * chunk[j];
      if (i === 0) {
        // Armed when the record starts below the record's mid level.
        isArmed = value < lower;
        before = value;
        top = bottom = value;
        continue;
      }
      if (!fixed) {
        // The envelope takes in this sample first, so that the first edge of the record is
        // timed against the level of its own swing. Each side is held while the signal comes
        // back near it every cycle (within 5 % of the width): a steady tacho keeps the exact
        // midpoint; then it relaxes.
        const near = 0.05 * (top - bottom);
        if (value > top) top = value;
        else if (i - topAt > held) top = value + (top - value) * r;
        if (value >= top - near) topAt = i;
        if (value < bottom) bottom = value;
        else if (i - bottomAt > held) bottom = value + (bottom - value) * r;
        if (value <= bottom + near) bottomAt = i;
        const h = Math.max(HYSTERESIS_FRACTION * (top - bottom), floor);
        level = (top + bottom) / 2;
        upper = level + h / 2;
        lower = level - h / 2;
      }
      if (before < level && value >= level) {
        cross = (i - 1 + (level - before) / (value - before)) / rate;
        crossStep = (value - before) / (upper - lower);
      }
      if (isArmed && value >= upper) {
        const t = Number.isNaN(cross) ? i / rate : cross;
        if (raw.length > 0) {
          // Hold and release follow the latest pulse interval.
          const interval = (t - raw[raw.length - 1]) * rate;
          r = Math.exp(-1 / (ENVELOPE_RELEASE_INTERVALS * interval));
          held = ENVELOPE_HOLD_INTERVALS * interval;
        }
        raw.push(t);
        steps.push(Number.isNaN(crossStep) ? 0 : crossStep);
        isArmed = false;
      } else if (!isArmed && value <= lower) {
        isArmed = true;
        // A pulse is timed by a crossing after its arming, never by an earlier one.
        cross = NaN;
        crossStep = NaN;
      }
      before = value;
    }
    armed = isArmed;
    lastCross = cross;
    previous = before;
    hi = top;
    lo = bottom;
    release = r;
    hold = held;
    hiAt = topAt;
    loAt = bottomAt;
  });
  steps.sort((a, b) => a - b);
  return { raw, steepness: steps.length > 0 ? steps[steps.length >> 1] : 0 };
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
  if (series.length < 2) throw new QuiverError("the tacho channel is flat: no pulses to find");
  const [least, p2, median, p98, most] = percentiles(series, [0, 2, 50, 98, 100]);
  // Pulses high (or low) for under 2 % of the time (a once-per-revolution mark, a
  // narrow optical tacho) leave both percentiles at the resting level: the levels are
  // then taken from the extremes, and only a channel with no excursion at all is flat.
  const narrow = p98 - p2 < NARROW_SHARE * (most - least);
  const low = narrow ? least : p2;
  const high = narrow ? most : p98;
  const fixed = options.level !== undefined || options.hysteresis !== undefined;
  const level = options.level ?? (low + high) / 2;
  const hysteresis = options.hysteresis ?? HYSTERESIS_FRACTION * (high - low);
  // The floor from the whole range: a narrow bipolar pulse can leave the 2nd–98th percentiles
  // on its lobes' flanks, a span of a few times the noise, and the noise then sets off pulses.
  const floor = HYSTERESIS_FLOOR * (most - least);
  if (!(hysteresis > 0)) {
    throw new QuiverError("the tacho channel is flat: no pulses to find");
  }
  // Both polarities are read, and the steeper crossings time the pulses (STEEPNESS_RATIO).
  // A bipolar inductive pulse (a positive lobe, then a negative one) falls steeply between its
  // lobes but rests at the level between pulses: read on rising crossings, each pulse would be
  // timed by noise at rest, and missed or doubled.
  const rising = triggerPulses(series, rate, { fixed, level, hysteresis, floor, sign: 1 });
  // Only a signal that rests mid-way between its extremes can be bipolar: a TTL tacho rests on a
  // rail, and one whose falling edges are steeper than its rising ones keeps its rising edges.
  const resting = Math.abs(median - (low + high) / 2) < BIPOLAR_REST * (high - low);
  const falling = !resting ? { raw: [], steepness: 0 } : triggerPulses(series, rate, {
    fixed,
    level: -level,
    hysteresis,
    floor,
    sign: -1,
  });
  const edge: "rising" | "falling" =
    falling.raw.length >= 3 && rising.steepness < STEEPNESS_RATIO * falling.steepness
      ? "falling"
      : "rising";
  const raw = edge === "rising" ? rising.raw : falling.raw;
  if (raw.length < 3) {
    throw new QuiverError(
      `only ${raw.length} tacho pulse(s) found; check the channel, level and hysteresis`,
    );
  }
  // Drop extra pulses first: of the two pulses bounding a short interval,
  // the spurious one is the one whose removal leaves an interval nearest
  // the local median.
  let removed = 0;
  const scratch = new Float64Array(2 * MEDIAN_HALF + 1);
  const times = raw.slice();
  const gaps = times.slice(1).map((t, k) => t - times[k]);
  for (let i = 0; i < gaps.length;) {
    const intervals = gaps;
    const median = localMedian(intervals, i, scratch);
    if (intervals[i] >= 0.5 * median) {
      i++;
      continue;
    }
    const mergeBefore = i > 0 ? Math.abs(intervals[i - 1] + intervals[i] - median) : Infinity;
    const mergeAfter = i + 1 < intervals.length
      ? Math.abs(intervals[i] + intervals[i + 1] - median)
      : Infinity;
    // Removing pulse p merges the two intervals on either side of it.
    const pulse = mergeBefore <= mergeAfter ? i : i + 1;
    times.splice(pulse, 1);
    if (pulse === 0) gaps.splice(0, 1);
    else if (pulse === times.length) gaps.splice(pulse - 1, 1);
    else gaps.splice(pulse - 1, 2, times[pulse] - times[pulse - 1]);
    removed++;
    i = Math.max(0, i - 1);
  }
  const intervals = times.slice(1).map((t, i) => t - times[i]);
  const medians = new Float64Array(intervals.length);
  for (let i = 0; i < intervals.length; i++) medians[i] = localMedian(intervals, i, scratch);
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

/**
 * Gaps filled (or, on a missing-tooth wheel, its reference gap recognised)
 * and each pulse's angle.
 */
function mendPulses(
  times: readonly number[],
  intervals: readonly number[],
  medians: Float64Array,
  ppr: number,
  missingTeeth: number,
):
  & Pick<
    TachoPulses,
    "times" | "angles" | "inserted" | "filled" | "references" | "mismatched" | "wheelHint"
  >
  & { silences: [number, number][] } {
  const silences: [number, number][] = [];
  const filled: number[] = [times[0]];
  const positions: number[] = [0];
  const stretches: [number, number][] = [];
  const fills: { at: number; count: number }[] = [];
  let inserted = 0;
  let position = 0;
  const marks: number[] = [];
  intervals.forEach((interval, i) => {
    const ratio = interval / medians[i];
    if (missingTeeth > 0 && Math.abs(ratio - (missingTeeth + 1)) < 0.5) {
      // The wheel's gap: the tooth after it is tooth 0 of a revolution (the marks are sorted
      // out below). Its teeth are counted on.
      position += missingTeeth + 1;
      marks.push(position);
      filled.push(times[i + 1]);
      positions.push(position);
      return;
    }
    const n = Math.round(ratio);
    if (n > FILL_MOST + 1) {
      // A silence: no pulse is invented. The angle is counted across it from the pulse rate
      // either side (the median of up to 5 intervals each side, averaged as rates: exact for
      // a pulse rate changing linearly).
      silences.push([times[i], times[i + 1]]);
      const before = medianOf(intervals, i - 5, i), after = medianOf(intervals, i + 1, i + 6);
      const rate = Number.isNaN(before)
        ? 1 / after
        : Number.isNaN(after)
        ? 1 / before
        : (1 / before + 1 / after) / 2;
      position += Math.max(1, Math.round(interval * rate));
      filled.push(times[i + 1]);
      positions.push(position);
      return;
    }
    if (interval > 1.5 * medians[i] && n >= 2) {
      for (let j = 1; j < n; j++) {
        filled.push(times[i] + (j * interval) / n);
        positions.push(++position);
      }
      inserted += n - 1;
      stretches.push([times[i], times[i + 1]]);
      fills.push({ at: i, count: n - 1 });
    }
    filled.push(times[i + 1]);
    positions.push(++position);
  });
  // The marks: the gap-sized intervals at the tooth position (mod ppr) where most of them
  // fall. One elsewhere is teeth lost mid-revolution: counted, not taken as a mark (the
  // teeth are counted on either way, so the angle is right). Angles count from a mark's tooth
  // 0 when there is one (whole revolutions there).
  const residues = new Map<number, number>();
  for (const m of marks) residues.set(m % ppr, (residues.get(m % ppr) ?? 0) + 1);
  let residue = NaN, references = 0;
  for (const [r, count] of residues) {
    if (count > references) [residue, references] = [r, count];
  }
  const mismatched = marks.length - references;
  const origin = marks.find((m) => m % ppr === residue) ?? 0;
  const angles = new Float64Array(positions.map((p) => (p - origin) / ppr));
  return {
    silences,
    times: new Float64Array(filled),
    angles,
    inserted,
    filled: stretches,
    references,
    mismatched,
    ...(missingTeeth === 0 ? wheelHint(fills) : {}),
  };
}

/** The median of values[from … to − 1], clipped to the array; NaN when none. */
function medianOf(values: readonly number[], from: number, to: number): number {
  const part = values.slice(Math.max(0, from), Math.min(values.length, to)).sort((a, b) => a - b);
  return part.length === 0 ? NaN : part[part.length >> 1];
}

/**
 * A missing-tooth wheel read as a plain one: the same count filled in at
 * least 3 gaps, the same number of pulses apart.
 */
function wheelHint(
  fills: readonly { at: number; count: number }[],
): { wheelHint?: { teeth: number; missing: number } } {
  if (fills.length < 3) return {};
  const missing = fills[0].count, spacing = fills[1].at - fills[0].at;
  for (let k = 1; k < fills.length; k++) {
    if (fills[k].count !== missing || fills[k].at - fills[k - 1].at !== spacing) return {};
  }
  return { wheelHint: { teeth: spacing + missing, missing } };
}

/** A shaft's angle and speed against time. */
export interface ShaftMotion {
  /** Times of the speed readings, s. */
  readonly times: Float64Array;
  /** Speed at those times, rpm. */
  readonly rpm: Float64Array;
  /** Angle in revolutions at any time within the pulses' span (monotone cubic). */
  angleAt(time: number): number;
  /** Speed in rpm at any time (linear between readings). */
  rpmAt(time: number): number;
  /** First and last time where the angle is known. */
  readonly span: readonly [number, number];
}

/** Monotone cubic Hermite interpolant through (x, y) (Fritsch & Carlson 1980). */
function monotoneCubic(x: Float64Array, y: Float64Array): (t: number) => number {
  const n = x.length;
  const slope = new Float64Array(n - 1).map((_, i) => (y[i + 1] - y[i]) / (x[i + 1] - x[i]));
  const m = new Float64Array(n);
  m[0] = slope[0];
  m[n - 1] = slope[n - 2];
  for (let i = 1; i < n - 1; i++) {
    // Weighted harmonic mean of neighbouring slopes (Fritsch–Butland form), keeps monotone.
    const h0 = x[i] - x[i - 1], h1 = x[i + 1] - x[i];
    const s0 = slope[i - 1], s1 = slope[i];
    m[i] = s0 * s1 <= 0 ? 0 : (3 * (h0 + h1)) / ((2 * h1 + h0) / s0 + (h1 + 2 * h0) / s1);
  }
  return (t: number) => {
    let lo = 0, hi = n - 1;
    if (t <= x[0]) return y[0] + m[0] * (t - x[0]);
    if (t >= x[n - 1]) return y[n - 1] + m[n - 1] * (t - x[n - 1]);
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (x[mid] <= t) lo = mid;
      else hi = mid;
    }
    const h = x[hi] - x[lo];
    const s = (t - x[lo]) / h;
    const h00 = (1 + 2 * s) * (1 - s) * (1 - s), h10 = s * (1 - s) * (1 - s);
    const h01 = s * s * (3 - 2 * s), h11 = s * s * (s - 1);
    return h00 * y[lo] + h10 * h * m[lo] + h01 * y[hi] + h11 * h * m[hi];
  };
}

function linear(x: Float64Array, y: Float64Array): (t: number) => number {
  return (t: number) => {
    if (t <= x[0]) return y[0];
    if (t >= x[x.length - 1]) return y[y.length - 1];
    let lo = 0, hi = x.length - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (x[mid] <= t) lo = mid;
      else hi = mid;
    }
    return y[lo] + ((t - x[lo]) / (x[hi] - x[lo])) * (y[hi] - y[lo]);
  };
}

/**
 * Shaft motion from cleaned pulse times. The angle at pulse j is exactly
 * j/ppr revolutions (or `angles[j]`, as on a missing-tooth wheel), while its
 * time carries the sampling's jitter (up to a sample for a TTL edge). So the
 * angle is fitted as a quadratic function of time over the pulses within
 * max(ppr, 6) either side (local least squares, exact for constant angular
 * acceleration however much the speed changes across the window; time as a
 * quadratic of angle is not, and read the low end of a tenfold run-up 3 %
 * high): each pulse's smoothed time is where the fit reaches its angle (one
 * Newton step from the measured time), and the speed is 60·dθ/dt there, in
 * rpm.
 *
 * @example
 * ```ts
 * import { motionFromPulses } from "./tacho.ts";
 * const times = new Float64Array(40).map((_, j) => j * 0.01); // 2 pulses/rev at 3000 rpm
 * const m = motionFromPulses(times, 2);
 * if (Math.abs(m.rpmAt(0.2) - 3000) > 1e-6 || Math.abs(m.angleAt(0.1) - 5) > 1e-9) throw new Error();
 * ```
 */
export function motionFromPulses(
  times: Float64Array,
  ppr: number,
  angles?: Float64Array,
): ShaftMotion {
  const n = times.length;
  const half = Math.max(ppr, 6);
  const angle = angles ?? new Float64Array(n).map((_, j) => j / ppr);
  const smoothed = new Float64Array(n);
  const rpm = new Float64Array(n);
  const scratch = new Float64Array(17), fit = new Float64Array(3);
  for (let j = 0; j < n; j++) {
    // A window of 2·half + 1 pulses, shifted rather than cut at the ends of the record: a
    // one-sided fit over half the pulses reads the end speeds off by the edge-time noise
    // (a TTL edge's time is known to ±½ sample). A cubic at the ends was tried: its lower
    // bias is lost to more noise.
    const lo = Math.max(0, Math.min(j - half, n - 1 - 2 * half));
    const hi = Math.min(n - 1, lo + 2 * half);
    const degree = Math.min(hi - lo, 2);
    if (degree < 1) {
      smoothed[j] = times[j];
      rpm[j] = NaN;
      continue;
    }
    polynomialFit(angle, times, { lo, hi, origin: times[j], degree }, scratch, fit);
    // One Newton step to where the fit reaches the pulse's angle. The speed is read at the
    // measured time: the two are a sample's jitter apart, too little for the speed to change.
    smoothed[j] = times[j] + (angle[j] - fit[0]) / fit[1];
    rpm[j] = 60 * fit[1];
  }
  for (let j = 1; j < n; j++) {
    if (!(smoothed[j] > smoothed[j - 1])) {
      throw new QuiverError(
        "the tacho pulses do not give a steadily turning shaft (time runs backwards after smoothing)",
      );
    }
  }
  return {
    times: smoothed,
    rpm,
    angleAt: monotoneCubic(smoothed, angle),
    rpmAt: linear(smoothed, rpm),
    span: [smoothed[0], smoothed[n - 1]],
  };
}

/**
 * Least-squares polynomial y ≈ Σ c_k·u^k (k ≤ degree ≤ 2), u = x − x₀, over
 * points lo…hi (called with y the angle and x the time: c₀ is the fitted
 * angle at t₀, c₁ = dθ/dt there); writes the coefficients to `out`. Normal
 * equations, solved by Gaussian elimination with partial pivoting (well
 * conditioned: u is measured from a point of the window). `scratch` holds the augmented matrix row by row and the
 * powers of u after it (at least 17 values): one fit per pulse allocates
 * nothing.
 */
function polynomialFit(
  y: Float64Array,
  x: Float64Array,
  window: { lo: number; hi: number; origin: number; degree: number },
  scratch: Float64Array,
  out: Float64Array,
): void {
  const { lo, hi, origin, degree } = window;
  const m = degree + 1, w = m + 1; // unknowns; width of a row of the augmented matrix
  const powersAt = m * w, powerCount = 2 * m - 1;
  scratch.fill(0, 0, m * w);
  for (let i = lo; i <= hi; i++) {
    const u = x[i] - origin;
    scratch[powersAt] = 1;
    for (let k = 1; k < powerCount; k++) scratch[powersAt + k] = scratch[powersAt + k - 1] * u;
    for (let r = 0; r < m; r++) {
      for (let c = 0; c < m; c++) scratch[r * w + c] += scratch[powersAt + r + c];
      scratch[r * w + m] += y[i] * scratch[powersAt + r];
    }
  }
  for (let col = 0; col < m; col++) {
    let pivot = col;
    for (let r = col + 1; r < m; r++) {
      if (Math.abs(scratch[r * w + col]) > Math.abs(scratch[pivot * w + col])) pivot = r;
    }
    if (pivot !== col) {
      for (let c = 0; c < w; c++) {
        const held = scratch[col * w + c];
        scratch[col * w + c] = scratch[pivot * w + c];
        scratch[pivot * w + c] = held;
      }
    }
    for (let r = col + 1; r < m; r++) {
      const f = scratch[r * w + col] / scratch[col * w + col];
      for (let c = col; c <= m; c++) scratch[r * w + c] -= f * scratch[col * w + c];
    }
  }
  for (let r = m - 1; r >= 0; r--) {
    let sum = scratch[r * w + m];
    for (let c = r + 1; c < m; c++) sum -= scratch[r * w + c] * out[c];
    out[r] = sum / scratch[r * w + r];
  }
}

/**
 * Shaft motion from a channel that already holds rpm: angle by trapezoidal
 * integration of rpm/60.
 *
 * @example
 * ```ts
 * import { motionFromRpm } from "./tacho.ts";
 * const m = motionFromRpm(new Float64Array(1001).fill(600), 100);
 * if (Math.abs(m.angleAt(10) - 100) > 1e-9) throw new Error();
 * ```
 */
export function motionFromRpm(rpm: Float64Array, rate: number): ShaftMotion {
  if (rpm.some((v) => !(v > 0))) {
    throw new QuiverError(
      "the rpm channel holds values of 0 or below; order tracking needs a turning shaft",
    );
  }
  const times = new Float64Array(rpm.length).map((_, i) => i / rate);
  const angle = new Float64Array(rpm.length);
  for (let i = 1; i < rpm.length; i++) {
    angle[i] = angle[i - 1] + ((rpm[i - 1] + rpm[i]) / 120) / rate;
  }
  return {
    times,
    rpm: rpm.slice(),
    angleAt: linear(times, angle),
    rpmAt: linear(times, rpm),
    span: [0, times[times.length - 1]],
  };
}
