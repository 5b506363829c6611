/**
 * The small shared steps of the analyses' diff readers (their `*_diff.ts`
 * beside each analysis): a numeric column that must be there, and the
 * result's numeric columns other than its grid.
 *
 * @module
 */
import { numericColumn, type ResultTable } from "../io/result_file.ts";
import type { TableColumn } from "../io/table.ts";

/**
 * The numeric column `name` of `result`; an Error naming the file when it is missing.
 *
 * @example
 * ```ts
 * import { requiredColumn } from "./spectral_columns.ts";
 * const t = { file: "r.json", columns: [{ name: "f", unit: "Hz", values: new Float64Array([1]) }] };
 * if (requiredColumn(t, "f").values[0] !== 1) throw new Error();
 * ```
 */
export function requiredColumn(result: ResultTable, name: string): TableColumn<Float64Array> {
  const column = numericColumn(result, name);
  if (column === undefined) throw new Error(`${result.file} has no numeric column "${name}"`);
  return column;
}

/**
 * The numeric columns of `result` whose names are not in `grid`, in order.
 *
 * @example
 * ```ts
 * import { valueColumns } from "./spectral_columns.ts";
 * const t = { file: "r.json", columns: [{ name: "f", unit: "Hz", values: new Float64Array([1]) },
 *   { name: "a", unit: "V", values: new Float64Array([2]) }] };
 * if (valueColumns(t, ["f"]).map((c) => c.name).join() !== "a") throw new Error();
 * ```
 */
export function valueColumns(
  result: ResultTable,
  grid: readonly string[],
): TableColumn<Float64Array>[] {
  return result.columns.filter((c): c is TableColumn<Float64Array> =>
    !grid.includes(c.name) && c.values instanceof Float64Array
  );
}
