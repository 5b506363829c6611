/**
 * Targets: limits a result must meet, each checked to pass or fail with its
 * margin (positive when met).
 *
 * - `min` / `max`: a single value, e.g. a minimum first-mode frequency or a
 *   maximum overall dB(A). Margin: value − limit for `min`, limit − value for `max`.
 * - `limit_curve`: a curve of (frequency, level) points; between points the
 *   limit is interpolated linearly in level against log-frequency. The
 *   result's curve is checked on its own lines inside the limit's range.
 *   Margin: the smallest limit − value (`max`) or value − limit (`min`) over
 *   those lines, with the frequency where it occurs.
 *
 * Component frequency targets and level limit curves are common practice in
 * vehicle development.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";

/** A checked target. */
export interface TargetResult {
  /** The target's id. */
  readonly id: string;
  /** What was checked, in words. */
  readonly description: string;
  /** Whether the result meets the limit. */
  readonly pass: boolean;
  /** Margin in the target's unit; positive when met. */
  readonly margin: number;
  /** Unit of the margin. */
  readonly unit: string;
  /** The value checked (single-value targets) or the worst-case value (curves). */
  readonly value: number;
  /** The limit at the worst case. */
  readonly limit: number;
  /** Frequency of the worst case (curves). */
  readonly atHz?: number;
  /** Nominal band frequency of the worst case, for a band result (curves). */
  readonly atNominalHz?: number;
  /** Every line or band that fails, in order (curves). */
  readonly failing?: readonly CurveFailure[];
  /** What the value was taken from, when it was chosen among several (e.g. which mode). */
  readonly basis?: string;
}

/** One line or band of a curve outside its limit. */
export interface CurveFailure {
  /** Frequency, Hz (band centre for a band result). */
  readonly atHz: number;
  /** Nominal band frequency, for a band result. */
  readonly nominalHz?: number;
  /** The result's level there. */
  readonly value: number;
  /** The limit there. */
  readonly limit: number;
  /** Margin, negative. */
  readonly margin: number;
}

/**
 * Checks a single value against a minimum or maximum.
 *
 * @example
 * ```ts
 * import { checkValue } from "./targets.ts";
 * const r = checkValue({ id: "first_mode", description: "first mode", value: 41.2, kind: "min", limit: 38, unit: "Hz" });
 * if (!r.pass || Math.abs(r.margin - 3.2) > 1e-12) throw new Error();
 * ```
 */
export function checkValue(target: {
  /** The target's id. */
  id: string;
  /** What is checked, in words. */
  description: string;
  /** The result's value. */
  value: number;
  /** `min`: the value must reach the limit; `max`: it must not exceed it. */
  kind: "min" | "max";
  /** The limit. */
  limit: number;
  /** Unit of value and limit. */
  unit: string;
  /** What the value was taken from, in words. Default: none. */
  basis?: string;
}): TargetResult {
  const { id, description, value, kind, limit, unit, basis } = target;
  if (!Number.isFinite(value)) {
    throw new RangeError(`the value of "${id}" is ${value}, not a finite number: not checked`);
  }
  const margin = kind === "min" ? value - limit : limit - value;
  return {
    id,
    description,
    pass: margin >= 0,
    margin,
    unit,
    value,
    limit,
    ...(basis !== undefined ? { basis } : {}),
  };
}

/**
 * The limit curve's level at `frequency`, linear in level against
 * log-frequency, or undefined outside its range.
 *
 * @example
 * ```ts
 * import { limitAt } from "./targets.ts";
 * if (Math.abs(limitAt([[100, 60], [1000, 50]], Math.sqrt(1e5))! - 55) > 1e-9) throw new Error();
 * ```
 */
export function limitAt(
  points: readonly (readonly [number, number])[],
  frequency: number,
): number | undefined {
  for (let i = 1; i < points.length; i++) {
    const [f0, l0] = points[i - 1];
    const [f1, l1] = points[i];
    if (frequency >= f0 && frequency <= f1) {
      const u = Math.log(frequency / f0) / Math.log(f1 / f0);
      return l0 + u * (l1 - l0);
    }
  }
  return undefined;
}

/**
 * Checks a curve against a limit curve.
 *
 * @throws {RangeError} when the limit's points are not increasing in frequency
 * or no line of the curve falls inside the limit's range.
 *
 * @example
 * ```ts
 * import { checkCurve } from "./targets.ts";
 * const r = checkCurve({ id: "cabin", description: "cabin thirds", frequencies: new Float64Array([100, 200]),
 *   levels: new Float64Array([58, 61]), kind: "max", points: [[50, 62], [400, 62]], unit: "dB" });
 * if (!r.pass || r.atHz !== 200 || Math.abs(r.margin - 1) > 1e-12 || r.failing?.length !== 0) throw new Error();
 * ```
 */
export function checkCurve(target: {
  /** The target's id. */
  id: string;
  /** What is checked, in words. */
  description: string;
  /** The result's frequencies (or band centres, or rpm). */
  frequencies: Float64Array;
  /** The result's levels on those lines. */
  levels: Float64Array;
  /** `max`: the levels must stay under the curve; `min`: above it. */
  kind: "min" | "max";
  /** The limit curve's (frequency, level) points, frequencies rising. */
  points: readonly (readonly [number, number])[];
  /** Unit of the levels. */
  unit: string;
  /** Nominal band frequencies on the same lines, for a band result. Default: none. */
  nominal?: ArrayLike<number>;
}): TargetResult {
  const { id, description, frequencies, levels, kind, points, unit, nominal } = target;
  const failing: CurveFailure[] = [];
  for (let i = 1; i < points.length; i++) {
    if (!(points[i][0] > points[i - 1][0]) || !(points[i - 1][0] > 0)) {
      throw new RangeError(`the limit curve of "${id}" must have positive, increasing frequencies`);
    }
  }
  let worst: TargetResult | undefined;
  frequencies.forEach((f, k) => {
    const limit = limitAt(points, f);
    if (limit === undefined) return;
    if (!Number.isFinite(levels[k])) {
      throw new RangeError(
        `the level at ${formatNumber(f)} Hz is missing or not finite: "${id}" cannot be checked`,
      );
    }
    const margin = kind === "min" ? levels[k] - limit : limit - levels[k];
    const band = nominal !== undefined ? { nominalHz: nominal[k] } : {};
    if (margin < 0) failing.push({ atHz: f, ...band, value: levels[k], limit, margin });
    if (worst === undefined || margin < worst.margin) {
      worst = {
        id,
        description,
        pass: margin >= 0,
        margin,
        unit,
        value: levels[k],
        limit,
        atHz: f,
        ...(nominal !== undefined ? { atNominalHz: nominal[k] } : {}),
      };
    }
  });
  if (worst === undefined) {
    throw new RangeError(`no line of the result falls inside the limit curve of "${id}"`);
  }
  return { ...(worst as TargetResult), failing };
}
