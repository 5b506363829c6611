/**
 * Per-segment trend removal, applied before the window as in Welch's method.
 *
 * @module
 */
import { parseChoice } from "../choices.ts";

/**
 * What to remove from each segment before windowing.
 *
 * @example
 * ```ts
 * import { DETREND_MODES } from "./detrend.ts";
 * if (!DETREND_MODES.includes("linear")) throw new Error();
 * ```
 */
export const DETREND_MODES = ["none", "mean", "linear"] as const;

/** `none`, `mean` (remove the segment mean) or `linear` (least-squares line). */
export type DetrendMode = typeof DETREND_MODES[number];

/**
 * Narrows a user-supplied string to a {@linkcode DetrendMode}.
 *
 * @throws {RangeError} for an unknown mode.
 *
 * @example
 * ```ts
 * import { parseDetrendMode } from "./detrend.ts";
 * if (parseDetrendMode("linear") !== "linear") throw new Error();
 * ```
 */
export function parseDetrendMode(mode: string): DetrendMode {
  return parseChoice(mode, DETREND_MODES, "detrend");
}

/**
 * Removes the mean or the least-squares line from `segment`, in place.
 *
 * @example
 * ```ts
 * import { detrendInPlace } from "./detrend.ts";
 * const x = new Float64Array([1, 2, 3, 4]);
 * detrendInPlace(x, "linear");
 * if (x.some((v) => Math.abs(v) > 1e-12)) throw new Error();
 * ```
 */
export function detrendInPlace(segment: Float64Array, mode: DetrendMode): void {
  const n = segment.length;
  if (mode === "none" || n === 0) return;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += segment[i];
  const mean = sum / n;
  if (mode === "mean") {
    for (let i = 0; i < n; i++) segment[i] -= mean;
    return;
  }
  // Least squares against t = i − (n−1)/2, which is orthogonal to the mean.
  const centre = (n - 1) / 2;
  let sxy = 0;
  for (let i = 0; i < n; i++) sxy += (i - centre) * segment[i];
  const sxx = n * (n * n - 1) / 12;
  const slope = n > 1 ? sxy / sxx : 0;
  for (let i = 0; i < n; i++) segment[i] -= mean + slope * (i - centre);
}
