/**
 * The modal fit's check for what it missed: a clear peak of the sum of |H|
 * (prominence ≥ 6 dB, at least 1 % of the highest peak, mean coherence ≥ 0.8
 * where known) that no mode explains (within 2 % or 2 lines) is named in a
 * warning.
 *
 * @module
 */
import type { FrfChannel } from "../frf/frf_data.ts";
import { findPeaks } from "./peaks.ts";
import { SELECTION_RULE } from "./selection_rule.ts";

/** A clear peak of the sum of FRFs that no reported mode explains. */
export interface UnexplainedPeak {
  /** Frequency of the peak's line, Hz. */
  readonly frequencyHz: number;
  /** Its prominence in the sum of |H|, dB. */
  readonly prominenceDb: number;
  /** Mean coherence over the FRFs at the line; undefined when they have none. */
  readonly coherence?: number;
}

/**
 * Clear peaks of the sum of |H| over the FRFs (as given) in the band that no
 * mode explains: prominence, height and coherence as {@linkcode SELECTION_RULE}.
 *
 * @example
 * ```ts
 * import { findUnexplainedPeaks } from "./unexplained_peaks.ts";
 * const f = new Float64Array(200).map((_, k) => k);
 * const magnitude = f.map((v) => 1 + 20 / (1 + (v - 60) ** 2) + 20 / (1 + (v - 140) ** 2));
 * const dofs = [{ frf: { name: "a", unit: "m/N", magnitude } }];
 * const peaks = findUnexplainedPeaks(f, 0, 200, dofs, [{ frequencyHz: 60.5 }]);
 * if (peaks.length !== 1 || peaks[0].frequencyHz !== 140) throw new Error();
 * ```
 */
export function findUnexplainedPeaks(
  frequencies: Float64Array,
  from: number,
  to: number,
  dofs: readonly { readonly frf: FrfChannel }[],
  modes: readonly { readonly frequencyHz: number }[],
): UnexplainedPeak[] {
  const sum = new Float64Array(to - from);
  for (const d of dofs) for (let k = from; k < to; k++) sum[k - from] += d.frf.magnitude[k];
  const f = frequencies.subarray(from, to);
  const peaks = findPeaks(f, sum, { prominenceDb: SELECTION_RULE.peakProminenceDb });
  let top = 0;
  for (const p of peaks) top = Math.max(top, sum[p.index]);
  const spacing = f.length > 1 ? (f[f.length - 1] - f[0]) / (f.length - 1) : 0;
  const withCoherence = dofs.filter((d) => d.frf.coherence !== undefined);
  const out: UnexplainedPeak[] = [];
  for (const p of peaks) {
    if (sum[p.index] < SELECTION_RULE.peakFloor * top) continue;
    let coherence: number | undefined;
    if (withCoherence.length > 0) {
      coherence = 0;
      for (const d of withCoherence) coherence += d.frf.coherence![from + p.index];
      coherence /= withCoherence.length;
      if (coherence < SELECTION_RULE.peakCoherence) continue;
    }
    const hz = f[p.index];
    const reach = Math.max(SELECTION_RULE.peakReach * hz, SELECTION_RULE.peakLines * spacing);
    if (modes.some((m) => Math.abs(m.frequencyHz - hz) <= reach)) continue;
    out.push({
      frequencyHz: hz,
      prominenceDb: p.prominenceDb,
      ...(coherence !== undefined ? { coherence } : {}),
    });
  }
  return out;
}
