/**
 * What `quiver diff` reads of a `level` result: each channel's Leq, Lmax,
 * Lmin and percentile levels as single values.
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";
import type { DiffModule, SingleValue } from "../history/run_diff_view.ts";
import { LEVEL_METADATA } from "./level_metadata.ts";

const KEYS = ["leq_db", "lmax_db", "lmin_db", "l10_db", "l50_db", "l90_db"];

/**
 * Each channel's summary levels.
 *
 * @example
 * ```ts
 * import { levelValues } from "./level_diff.ts";
 * const v = levelValues({ file: "l.json", columns: [], metadata: { analysis: "level", weighting: "A",
 *   time_weighting: "fast", summary: [{ channel: "mic", unit: "dB(A)", leq_db: 66, lmax_db: 70 }] } });
 * if (v.length !== 2 || v[0].name !== "mic leq" || v[1].value !== 70) throw new Error();
 * ```
 */
export function levelValues(result: ResultTable): SingleValue[] {
  const out: SingleValue[] = [];
  for (const row of LEVEL_METADATA.parse(result.metadata).summary) {
    for (const key of KEYS) {
      const value = row[key];
      if (typeof value === "number" && Number.isFinite(value)) {
        out.push({ name: `${row.channel} ${key.replace(/_db$/, "")}`, value, unit: row.unit });
      }
    }
  }
  return out;
}

/** The level's part in `quiver diff`. */
export const LEVEL_DIFF: DiffModule = { values: levelValues };
