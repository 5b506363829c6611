/**
 * What `quiver diff` reads of a `spectrogram` result (against time or rpm,
 * tidy: one row per frame and line): each channel's values on the
 * (frame, line) grid, a power, an amplitude or a level by its `kind` and
 * `db`, with the degrees of freedom of a frame's segments (Welch's
 * equivalent for their overlap).
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";
import type { DiffModule, SpectralDiffView } from "../history/run_diff_view.ts";
import { segmentDegrees } from "../history/segment_dof.ts";
import { requiredColumn, valueColumns } from "../history/spectral_columns.ts";
import { SPECTROGRAM_METADATA } from "./spectrogram_metadata.ts";

/**
 * A spectrogram result as lines of channels for `quiver diff`.
 *
 * @example
 * ```ts
 * import { spectrogramDiffView } from "./spectrogram_diff.ts";
 * const v = spectrogramDiffView({ file: "g.json", metadata: { analysis: "spectrogram", against: "time",
 *   kind: "psd", db: true, block: 64, overlap_samples: 0, window: "hann", segments_per_frame: 3 }, columns: [
 *   { name: "time_s", unit: "s", values: new Float64Array([0]) },
 *   { name: "frequency_hz", unit: "", values: new Float64Array([0]) },
 *   { name: "mic", unit: "dB", values: new Float64Array([50]) }] });
 * if (v.grid.length !== 2 || v.columns[0].quantity !== "level" || v.columns[0].degreesOfFreedom !== 6) throw new Error();
 * ```
 */
export function spectrogramDiffView(result: ResultTable): SpectralDiffView {
  const metadata = SPECTROGRAM_METADATA.parse(result.metadata);
  const along = metadata.against === "rpm" ? "rpm" : "time_s";
  const perFrame = result.metadata?.segments_per_frame;
  const degrees = segmentDegrees(result.metadata, typeof perFrame === "number" ? perFrame : 1);
  const quantity = metadata.db
    ? "level" as const
    : metadata.kind === "psd" || metadata.kind === "power"
    ? "power" as const
    : "amplitude" as const;
  return {
    grid: [requiredColumn(result, along), requiredColumn(result, "frequency_hz")],
    columns: valueColumns(result, [along, "frequency_hz"]).map((c) => ({
      name: c.name,
      unit: c.unit,
      quantity,
      values: c.values,
      degreesOfFreedom: typeof degrees === "string" ? undefined : degrees.dof,
    })),
    statistics: typeof degrees === "string"
      ? `no verdict: ${degrees}`
      : `each frame: ${degrees.how}`,
  };
}

/** The spectrogram's part in `quiver diff`. */
export const SPECTROGRAM_DIFF: DiffModule = { spectral: spectrogramDiffView };
