/**
 * Tacho pulses cleaned: extra pulses dropped, gaps filled, missing-tooth
 * wheels recognised, silences named.
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
 * @module
 */

/**
 * The most pulses filled into one gap: 2 (an interval of up to 3.5 local intervals). A longer
 * gap is a silence of the tacho, named, and never filled with invented pulses.
 *
 * @example
 * ```ts
 * import { FILL_MOST } from "./tacho_repair.ts";
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
 * import { REPAIR_LIMIT } from "./tacho_repair.ts";
 * if (REPAIR_LIMIT !== 0.05) throw new Error();
 * ```
 */
export const REPAIR_LIMIT = 0.05;

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
 * The pulses with the extra ones dropped: of the two pulses bounding an
 * interval shorter than half the local median, the one whose removal leaves
 * an interval nearest the local median.
 *
 * @example
 * ```ts
 * import { dropExtraPulses } from "./tacho_repair.ts";
 * const raw = [0, 0.1, 0.2, 0.23, 0.3, 0.4, 0.5, 0.6];
 * const { times, removed } = dropExtraPulses(raw);
 * if (removed !== 1 || times.length !== 7 || times.includes(0.23)) throw new Error();
 * ```
 */
export function dropExtraPulses(raw: readonly number[]): { times: number[]; removed: number } {
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
  return { times, removed };
}

/**
 * The local median (of the 11 around it) of each interval.
 *
 * @example
 * ```ts
 * import { localMedians } from "./tacho_repair.ts";
 * const m = localMedians([1, 1, 5, 1, 1]);
 * if (m.some((v) => v !== 1)) throw new Error();
 * ```
 */
export function localMedians(intervals: readonly number[]): Float64Array {
  const scratch = new Float64Array(2 * MEDIAN_HALF + 1);
  const medians = new Float64Array(intervals.length);
  for (let i = 0; i < intervals.length; i++) medians[i] = localMedian(intervals, i, scratch);
  return medians;
}

/**
 * Gaps filled (or, on a missing-tooth wheel, its reference gap recognised)
 * and each pulse's angle; `silences` are the gaps too long to fill.
 *
 * @example
 * ```ts
 * import { localMedians, mendPulses } from "./tacho_repair.ts";
 * // One pulse missing at 0.5 s from a 10 Hz, 1 pulse/rev tacho.
 * const times = [0, 0.1, 0.2, 0.3, 0.4, 0.6, 0.7, 0.8, 0.9];
 * const intervals = times.slice(1).map((t, i) => t - times[i]);
 * const m = mendPulses(times, intervals, localMedians(intervals), 1, 0);
 * if (m.inserted !== 1 || m.times.length !== 10 || m.angles[9] !== 9) throw new Error();
 * ```
 */
export function mendPulses(
  times: readonly number[],
  intervals: readonly number[],
  medians: Float64Array,
  ppr: number,
  missingTeeth: number,
): {
  times: Float64Array;
  angles: Float64Array;
  inserted: number;
  filled: [number, number][];
  references: number;
  mismatched: number;
  wheelHint?: { teeth: number; missing: number };
  silences: [number, number][];
} {
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
