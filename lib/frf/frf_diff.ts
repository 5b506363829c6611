/**
 * What `quiver diff` reads of an FRF result (`frf` and `hammer`): each
 * response's magnitude and coherence, and the independent averages behind
 * them (overlapping segments counted by Welch's equivalent degrees of
 * freedom, ν/2; a hammer's hits are independent records).
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";
import type { DiffModule, SpectralDiffView } from "../history/run_diff_view.ts";
import { segmentDegrees } from "../history/segment_dof.ts";
import { requiredColumn } from "../history/spectral_columns.ts";
import { FRF_METADATA } from "./frf_metadata.ts";

/**
 * An FRF result as lines of responses for `quiver diff`.
 *
 * @throws {Error} for a result that is not a single-input FRF (an FRF matrix is not read here).
 *
 * @example
 * ```ts
 * import { frfDiffView } from "./frf_diff.ts";
 * const v = frfDiffView({ file: "h.json", metadata: { analysis: "hammer", estimator: "h1", averages: 5,
 *   responses: [{ name: "z", unit: "m/s^2", form: null, frf_unit: "(m/s^2)/N" }] }, columns: [
 *   { name: "frequency_hz", unit: "", values: new Float64Array([1]) },
 *   { name: "z_mag", unit: "(m/s^2)/N", values: new Float64Array([2]) },
 *   { name: "z_coherence", unit: "", values: new Float64Array([0.9]) }] });
 * if (v.columns[0].quantity !== "frf" || v.columns[0].averages !== 5) throw new Error();
 * ```
 */
export function frfDiffView(result: ResultTable): SpectralDiffView {
  const parsed = FRF_METADATA.safeParse(result.metadata);
  if (!parsed.success) throw new Error(`${result.file} is not a single-input FRF result`);
  const metadata = parsed.data;
  const overlap = result.metadata?.overlap_samples;
  const degrees = typeof overlap === "number" && overlap > 0
    ? segmentDegrees(result.metadata)
    : undefined;
  const averages = degrees === undefined || typeof degrees === "string"
    ? metadata.averages
    : degrees.dof / 2;
  return {
    grid: [requiredColumn(result, "frequency_hz")],
    columns: metadata.responses.map((r) => ({
      name: r.name,
      unit: r.frf_unit,
      quantity: "frf" as const,
      values: requiredColumn(result, `${r.name}_mag`).values,
      coherence: requiredColumn(result, `${r.name}_coherence`).values,
      averages,
    })),
    statistics: `FRF magnitude, random error from coherence with ${
      averages.toFixed(1)
    } independent average(s)${
      degrees !== undefined && typeof degrees !== "string"
        ? ` (${metadata.averages} overlapping segments counted by Welch's equivalent degrees of freedom)`
        : ""
    }`,
  };
}

/** The FRF's part in `quiver diff` (frf and hammer). */
export const FRF_DIFF: DiffModule = { spectral: frfDiffView };
