/**
 * What `quiver diff` reads of a `spectrum` result: each channel's line
 * values, a power quantity for `psd` and `power`, an amplitude for `rms` and
 * `peak`, with the degrees of freedom of its linear average.
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";
import type { DiffModule, SpectralDiffView } from "../history/run_diff_view.ts";
import { segmentDegrees } from "../history/segment_dof.ts";
import { requiredColumn, valueColumns } from "../history/spectral_columns.ts";
import { SPECTRUM_METADATA } from "./spectrum_metadata.ts";

/**
 * A spectrum result as lines of channels for `quiver diff`.
 *
 * @throws {Error} for a result that is not a spectrum with a frequency column.
 *
 * @example
 * ```ts
 * import { spectrumDiffView } from "./spectrum_diff.ts";
 * const v = spectrumDiffView({ file: "s.json", metadata: { analysis: "spectrum", kind: "rms", df_hz: 1,
 *   averages: 4, window: "hann", block: 8, overlap_samples: 0 }, columns: [
 *   { name: "frequency_hz", unit: "", values: new Float64Array([0, 1]) },
 *   { name: "mic", unit: "Pa", values: new Float64Array([1, 2]) }] });
 * if (v.columns[0].quantity !== "amplitude" || v.columns[0].degreesOfFreedom !== 8) throw new Error();
 * ```
 */
export function spectrumDiffView(result: ResultTable): SpectralDiffView {
  const metadata = SPECTRUM_METADATA.parse(result.metadata);
  const quantity = metadata.kind === "psd" || metadata.kind === "power" ? "power" : "amplitude";
  const degrees = segmentDegrees(result.metadata);
  return {
    grid: [requiredColumn(result, "frequency_hz")],
    columns: valueColumns(result, ["frequency_hz"]).map((c) => ({
      name: c.name,
      unit: c.unit,
      quantity,
      values: c.values,
      degreesOfFreedom: typeof degrees === "string" ? undefined : degrees.dof,
    })),
    statistics: typeof degrees === "string"
      ? `no verdict: ${degrees}`
      : `${metadata.kind} spectrum, ${degrees.how}`,
  };
}

/** The spectrum's part in `quiver diff`. */
export const SPECTRUM_DIFF: DiffModule = { spectral: spectrumDiffView };
