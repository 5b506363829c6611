/**
 * What `quiver diff` reads of an `orders` result: each order cut against
 * rpm, an amplitude (or its level in dB with `--db`).
 *
 * Each order value comes from one block's spectrum at the order's line, so
 * for the random part of the signal it is a single-line estimate with 2
 * degrees of freedom (Bendat & Piersol, Random Data, sec. 8.5: n = 1). A
 * tonal order is deterministic and far surer than that: the verdict is a
 * cautious one. The overall columns (an energy over a block's whole band)
 * get no verdict: the result does not say over how many independent lines.
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";
import type { DiffModule, SpectralDiffView } from "../history/run_diff_view.ts";
import { requiredColumn, valueColumns } from "../history/spectral_columns.ts";
import { ORDERS_METADATA } from "./orders_metadata.ts";

/**
 * An orders result as lines (rpm steps) of order cuts for `quiver diff`.
 *
 * @example
 * ```ts
 * import { ordersDiffView } from "./orders_diff.ts";
 * const v = ordersDiffView({ file: "o.json", metadata: { analysis: "orders", amplitude: "rms", method: "angle",
 *   weighting: "Z", db: false }, columns: [{ name: "rpm", unit: "rpm", values: new Float64Array([1000]) },
 *   { name: "a_order2", unit: "m/s^2", values: new Float64Array([1]) },
 *   { name: "a_overall", unit: "m/s^2", values: new Float64Array([2]) }] });
 * if (v.columns[0].degreesOfFreedom !== 2 || v.columns[1].degreesOfFreedom !== undefined) throw new Error();
 * ```
 */
export function ordersDiffView(result: ResultTable): SpectralDiffView {
  const metadata = ORDERS_METADATA.parse(result.metadata);
  return {
    grid: [requiredColumn(result, "rpm")],
    columns: valueColumns(result, ["rpm"]).map((c) => ({
      name: c.name,
      unit: c.unit,
      quantity: metadata.db ? "level" as const : "amplitude" as const,
      values: c.values,
      degreesOfFreedom: c.name.endsWith("_overall") ? undefined : 2,
    })),
    statistics:
      "order cuts: each value one block's line, 2 degrees of freedom (cautious for a tonal order); overall columns without a verdict",
  };
}

/** The orders' part in `quiver diff`. */
export const ORDERS_DIFF: DiffModule = { spectral: ordersDiffView };
