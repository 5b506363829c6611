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

/** What a peak's coherence says about it; see {@linkcode judgeCoherence}. */
export interface CoherenceJudgement {
  /** Mean coherence over the peak's own lines. */
  readonly own: number;
  /** Mean coherence over the lines just below the peak's own, or null when there are none. */
  readonly below: number | null;
  /** Mean coherence over the lines just above the peak's own, or null when there are none. */
  readonly above: number | null;
  /** The verdict: `coherent`, a `dip` confined to the peak's own lines, or `noise`. */
  readonly verdict: "coherent" | "dip" | "noise";
}

/** Options of {@linkcode judgeCoherence}. */
export interface CoherenceJudgementOptions {
  /** Lowest line of the peak's half-power band, when known. Default: the peak line. */
  bandLow?: number;
  /** Highest line of the peak's half-power band, when known. Default: the peak line. */
  bandHigh?: number;
  /** Coherence below which lines are not usable. Default 0.8 (common practice). */
  gate?: number;
  /** Lines either side of the peak that belong to it whatever its band. Default 2. */
  lobe?: number;
  /** Lines on each side, beyond the peak's own, that judge its neighbourhood. Default 3. */
  side?: number;
}

const meanOver = (values: Float64Array, lo: number, hi: number): number | null => {
  if (hi < lo) return null;
  let sum = 0;
  for (let k = lo; k <= hi; k++) sum += values[k];
  return sum / (hi - lo + 1);
};

/**
 * Judges a peak by the coherence around it, never by its line alone.
 *
 * The peak's own lines are its half-power band widened to `lobe` lines either
 * side of the peak: a lightly damped mode measured with coarse lines bends
 * every line the window's main lobe reaches (±2 lines for Hann), and there
 * the estimated coherence falls although the system is linear and the signal
 * strong: the leakage (resolution) bias at lightly damped peaks (Harris'
 * Shock and Vibration Handbook, ch. 21, Fig. 21.10: coherence lowest where
 * the FRF peaks, "an indication of leakage"; Josefsson, Ahlin & Broman,
 * Shock and Vibration 19 (2012) 1257–1266, for H1 with a Hann window). Its
 * neighbourhood is `side` lines on each side beyond them.
 *
 * - `coherent`: the mean over the own lines reaches the gate.
 * - `dip`: it does not, but both sides reach the gate: a coherence dip
 *   confined to the peak, the mark of resolution bias (or of a force drop at
 *   resonance), not of noise. The peak is a resonance.
 * - `noise`: the own lines and at least one side are below the gate (or a
 *   side has no lines): nothing around the peak supports it.
 *
 * @example
 * ```ts
 * import { judgeCoherence } from "./peaks.ts";
 * const dip = new Float64Array([0.99, 0.98, 0.97, 0.95, 0.7, 0.3, 0.5, 0.9, 0.97, 0.98, 0.99]);
 * if (judgeCoherence(dip, 5).verdict !== "dip") throw new Error();
 * const low = new Float64Array([0.4, 0.3, 0.5, 0.2, 0.6, 0.3, 0.5, 0.4, 0.3, 0.5, 0.4]);
 * if (judgeCoherence(low, 5).verdict !== "noise") throw new Error();
 * ```
 */
export function judgeCoherence(
  coherence: Float64Array,
  peakIndex: number,
  options: CoherenceJudgementOptions = {},
): CoherenceJudgement {
  const gate = options.gate ?? 0.8;
  const lobe = options.lobe ?? 2;
  const side = options.side ?? 3;
  const last = coherence.length - 1;
  if (!Number.isInteger(peakIndex) || peakIndex < 0 || peakIndex > last) {
    throw new RangeError(`peak line ${peakIndex} is outside the ${coherence.length} lines`);
  }
  const lo = Math.max(0, Math.min(options.bandLow ?? peakIndex, peakIndex - lobe));
  const hi = Math.min(last, Math.max(options.bandHigh ?? peakIndex, peakIndex + lobe));
  const own = meanOver(coherence, lo, hi)!;
  const below = meanOver(coherence, Math.max(0, lo - side), lo - 1);
  const above = meanOver(coherence, hi + 1, Math.min(last, hi + side));
  const verdict = own >= gate
    ? "coherent"
    : below !== null && above !== null && below >= gate && above >= gate
    ? "dip"
    : "noise";
  return { own, below, above, verdict };
}
