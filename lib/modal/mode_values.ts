/**
 * What `quiver diff` reads of a mode table (`damping`, `modal`): each
 * numbered mode's natural frequency and damping ratio, per channel where
 * the table has a channel column.
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";
import type { DiffModule, SingleValue } from "../history/run_diff_view.ts";

/**
 * A column as numbers: numeric (modal) or text where a table leaves some
 * cells empty (damping's unnumbered candidates, a damping it could not
 * estimate): an empty cell is NaN, never 0.
 */
function numbers(result: ResultTable, name: string): number[] {
  const column = result.columns.find((c) => c.name === name);
  if (column === undefined) throw new Error(`${result.file} has no column "${name}"`);
  return Array.from(column.values, (v: number | string) => (v === "" ? NaN : Number(v)));
}

/**
 * The numbered modes' frequencies (Hz) and damping ratios (%).
 *
 * @example
 * ```ts
 * import { modeValues } from "./mode_values.ts";
 * const v = modeValues({ file: "m.json", columns: [
 *   { name: "mode", unit: "", values: new Float64Array([1]) },
 *   { name: "frequency_hz", unit: "", values: new Float64Array([44]) },
 *   { name: "damping_ratio", unit: "", values: new Float64Array([0.02]) }] });
 * if (v[0].name !== "mode 1 frequency" || v[1].value !== 2 || v[1].unit !== "%") throw new Error();
 * ```
 */
export function modeValues(result: ResultTable): SingleValue[] {
  const mode = numbers(result, "mode");
  const frequency = numbers(result, "frequency_hz");
  const damping = numbers(result, "damping_ratio");
  const channels = result.columns.find((c) => c.name === "channel")?.values;
  const out: SingleValue[] = [];
  for (let i = 0; i < mode.length; i++) {
    // An unnumbered candidate (no mode number) is no mode a build is judged on.
    if (!Number.isFinite(mode[i])) continue;
    const who = Array.isArray(channels) ? `${channels[i]} mode ${mode[i]}` : `mode ${mode[i]}`;
    out.push({ name: `${who} frequency`, value: frequency[i], unit: "Hz" });
    out.push({ name: `${who} damping`, value: 100 * damping[i], unit: "%" });
  }
  return out;
}

/** The mode tables' part in `quiver diff` (damping and modal). */
export const MODE_DIFF: DiffModule = { values: modeValues };
