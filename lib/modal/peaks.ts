/**
 * Peak picking on an FRF magnitude: local maxima whose prominence (height in
 * dB above the higher of the two lowest points separating it from higher
 * ground on either side) reaches a threshold, inside a frequency range.
 *
 * @module
 */

/** Options of {@linkcode findPeaks}. */
export interface PeakOptions {
  /** Smallest prominence in dB. Default 6 dB. */
  prominenceDb?: number;
  /** Lowest frequency considered, Hz. Default: the first line. */
  minHz?: number;
  /** Highest frequency considered, Hz. Default: the last line. */
  maxHz?: number;
}

/** One peak found. */
export interface Peak {
  /** Line index of the local maximum. */
  readonly index: number;
  /** Its prominence in dB. */
  readonly prominenceDb: number;
}

/**
 * The prominent peaks of `magnitude`, in frequency order.
 *
 * @example
 * ```ts
 * import { findPeaks } from "./peaks.ts";
 * const mag = new Float64Array([1, 2, 10, 2, 1, 1.1, 1, 5, 1]);
 * const f = mag.map((_, k) => k);
 * if (findPeaks(f, mag).map((p) => p.index).join() !== "2,7") throw new Error();
 * ```
 */
export function findPeaks(
  frequencies: Float64Array,
  magnitude: Float64Array,
  options: PeakOptions = {},
): Peak[] {
  const threshold = options.prominenceDb ?? 6;
  const minHz = options.minHz ?? -Infinity;
  const maxHz = options.maxHz ?? Infinity;
  const n = magnitude.length;
  const inRange = (k: number) => frequencies[k] >= minHz && frequencies[k] <= maxHz;
  const db = magnitude.map((m) => 20 * Math.log10(m));
  const peaks: Peak[] = [];
  for (let k = 1; k < n - 1; k++) {
    if (!inRange(k) || !(db[k] > db[k - 1] && db[k] >= db[k + 1])) continue;
    // Walk each way until higher ground or the end, keeping the lowest point.
    let leftMin = db[k];
    for (let i = k - 1; i >= 0 && db[i] <= db[k]; i--) leftMin = Math.min(leftMin, db[i]);
    let rightMin = db[k];
    for (let i = k + 1; i < n && db[i] <= db[k]; i++) rightMin = Math.min(rightMin, db[i]);
    const prominence = db[k] - Math.max(leftMin, rightMin);
    if (prominence >= threshold) peaks.push({ index: k, prominenceDb: prominence });
  }
  return peaks;
}
