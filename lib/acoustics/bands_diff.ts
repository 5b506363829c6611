/**
 * What `quiver diff` reads of a `bands` result: each channel's band levels
 * (levels of a power quantity) and their degrees of freedom, and each
 * channel's overall level as a single value.
 *
 * Degrees of freedom of a band (fft method): the lines' own (Welch's
 * equivalent for the segments and their overlap) times the number of
 * independent lines in the band, its width over the window's noise
 * bandwidth (at least one line): the bandwidth-time product of Bendat &
 * Piersol, Random Data, sec. 8.5 (ν = 2·B·T). The filter method records no
 * averages, so its bands get no verdict.
 *
 * @module
 */
import { parseWindowName, windowGains, windowSamples } from "../dsp/windows.ts";
import type { ResultTable } from "../io/result_file.ts";
import type { DiffModule, SingleValue, SpectralDiffView } from "../history/run_diff_view.ts";
import { segmentDegrees } from "../history/segment_dof.ts";
import { requiredColumn, valueColumns } from "../history/spectral_columns.ts";
import { BANDS_METADATA } from "./bands_metadata.ts";

const GRID = ["center_hz", "nominal_hz", "lower_hz", "upper_hz"];

/**
 * A bands result as lines (bands) of channels for `quiver diff`.
 *
 * @example
 * ```ts
 * import { bandsDiffView } from "./bands_diff.ts";
 * const v = bandsDiffView({ file: "b.json", metadata: { analysis: "bands", method: "fft", fraction: 3,
 *   weighting: "A", overall: [], block: 1024, averages: 4, overlap_samples: 0, window: "hann", df_hz: 1 },
 *   columns: ["center_hz", "nominal_hz", "lower_hz", "upper_hz", "mic"].map((name, i) =>
 *     ({ name, unit: "", values: new Float64Array([[100, 100, 89, 112, 60][i]]) })) });
 * // 8 dof per line × 23 Hz / (1.5 lines × 1 Hz)
 * if (Math.abs((v.columns[0].degreesOfFreedom as Float64Array)[0] - 8 * 23 / 1.5) > 1e-6) throw new Error();
 * ```
 */
export function bandsDiffView(result: ResultTable): SpectralDiffView {
  BANDS_METADATA.parse(result.metadata);
  const m = result.metadata ?? {};
  const lower = requiredColumn(result, "lower_hz").values;
  const upper = requiredColumn(result, "upper_hz").values;
  const degrees = m.method === "fft" ? segmentDegrees(m) : "the filter method records no averages";
  let dof: Float64Array | undefined;
  let how: string;
  if (typeof degrees === "string") {
    how = `no verdict: ${degrees}`;
  } else {
    const df = typeof m.df_hz === "number" ? m.df_hz : NaN;
    const block = m.block as number;
    const enbwBins = windowGains(windowSamples(parseWindowName(String(m.window)), block)).enbwBins;
    dof = lower.map((lo, i) => degrees.dof * Math.max(1, (upper[i] - lo) / (enbwBins * df)));
    how = `band levels; ${degrees.how}, times each band's width over the window's noise bandwidth`;
  }
  return {
    grid: [requiredColumn(result, "center_hz")],
    columns: valueColumns(result, GRID).map((c) => ({
      name: c.name,
      unit: c.unit,
      quantity: "level" as const,
      values: c.values,
      degreesOfFreedom: dof,
    })),
    statistics: how,
  };
}

/**
 * Each channel's overall level.
 *
 * @example
 * ```ts
 * import { bandsValues } from "./bands_diff.ts";
 * const v = bandsValues({ file: "b.json", columns: [], metadata: { analysis: "bands", fraction: 3, weighting: "A",
 *   overall: [{ channel: "mic", level_db: 66, unit: "dB(A)" }] } });
 * if (v[0].name !== "mic overall" || v[0].value !== 66) throw new Error();
 * ```
 */
export function bandsValues(result: ResultTable): SingleValue[] {
  return BANDS_METADATA.parse(result.metadata).overall
    .filter((o) => o.level_db !== null)
    .map((o) => ({ name: `${o.channel} overall`, value: o.level_db as number, unit: o.unit }));
}

/** The bands' part in `quiver diff`. */
export const BANDS_DIFF: DiffModule = { spectral: bandsDiffView, values: bandsValues };
