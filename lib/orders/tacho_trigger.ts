/**
 * Tacho pulses from the record: a Schmitt trigger on the pulses' envelope.
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
 * @module
 */
import { QuiverError } from "../errors.ts";
import { kthSmallestOfMany, type SampleSeries } from "../io/sample_series.ts";

/**
 * The envelope's release time constant in pulse intervals: long enough that
 * the envelope keeps most of the last peak through a missing tooth's gap
 * (after the hold, e^(−1/3) = 72 % at the end of a 60-2 wheel's low phase),
 * short enough to follow a run-up's amplitude (common practice for peak
 * detectors: a few periods).
 *
 * @example
 * ```ts
 * import { ENVELOPE_RELEASE_INTERVALS } from "./tacho_trigger.ts";
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
 * import { ENVELOPE_HOLD_INTERVALS } from "./tacho_trigger.ts";
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
 * import { HYSTERESIS_FRACTION } from "./tacho_trigger.ts";
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
 * import { HYSTERESIS_FLOOR } from "./tacho_trigger.ts";
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
 * import { STEEPNESS_RATIO } from "./tacho_trigger.ts";
 * if (STEEPNESS_RATIO !== 0.5) throw new Error();
 * ```
 */
export const STEEPNESS_RATIO = 0.5;

/**
 * A tacho is taken as bipolar, and may be timed on its falling crossings (see
 * {@linkcode STEEPNESS_RATIO}), only when its median sample lies within this share of the
 * 2nd–98th percentile span (of the range, for narrow pulses) from their midpoint: an inductive
 * pickup rests at zero between its positive and negative lobes, a TTL tacho on a rail.
 *
 * @example
 * ```ts
 * import { BIPOLAR_REST } from "./tacho_trigger.ts";
 * if (BIPOLAR_REST !== 0.2) throw new Error();
 * ```
 */
export const BIPOLAR_REST = 0.2;

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
 * The raw pulse times of the tacho: the trigger fixed by `level` or
 * `hysteresis` when either is given, else following the pulses; both
 * polarities read, and the steeper crossings time the pulses (see the
 * module). Also what the trigger was: fixed or not, its level, hysteresis
 * and floor.
 *
 * @throws {QuiverError} for a flat channel, or fewer than 3 pulses.
 *
 * @example
 * ```ts
 * import { memorySeries } from "../io/sample_series.ts";
 * import { readPulses } from "./tacho_trigger.ts";
 * // 10 Hz square wave at 1 kHz: a rising edge every 0.1 s.
 * const x = new Float64Array(1000).map((_, i) => (Math.floor(i / 50) % 2 === 0 ? 0 : 5));
 * const p = readPulses(memorySeries(x), 1000, {});
 * if (p.raw.length !== 10 || p.edge !== "rising" || p.fixed) throw new Error();
 * ```
 */
export function readPulses(
  series: SampleSeries,
  rate: number,
  options: { readonly level?: number; readonly hysteresis?: number },
): {
  raw: number[];
  edge: "rising" | "falling";
  fixed: boolean;
  level: number;
  hysteresis: number;
  floor: number;
} {
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
  return { raw, edge, fixed, level, hysteresis, floor };
}
