/**
 * What a section reads: a result file (or what kept it from being read),
 * the side results a step wrote next to it, and columns as numbers.
 *
 * @module
 */
import { join } from "node:path";
import { QuiverError } from "../errors.ts";
import { numericColumn, readResultFile, type ResultTable } from "../io/result_file.ts";
import type { ColumnValues, TableColumn } from "../io/table.ts";
import type { SectionInput } from "./section.ts";

/**
 * A column's values as numbers. The reader gives NaN, never 0, for a value
 * that was not finite (e.g. −∞ dB): plots skip it.
 *
 * @example
 * ```ts
 * import { numbers } from "./section_data.ts";
 * const v = numbers({ name: "a", unit: "", values: ["1", "2"] });
 * if (!(v instanceof Float64Array) || v[1] !== 2) throw new Error();
 * ```
 */
export const numbers = (c: TableColumn<ColumnValues>): Float64Array =>
  c.values instanceof Float64Array ? c.values : Float64Array.from(c.values, Number);

/** A result, or what kept it from being read. */
export async function readResult(path: string): Promise<ResultTable | QuiverError> {
  try {
    return await readResultFile(path);
  } catch (error) {
    if (error instanceof QuiverError) return error;
    throw error;
  }
}

/**
 * A side result of the step (`<outDir>/<step id>_<suffix>.json`), or
 * undefined when there is none or it cannot be read: a section shows what
 * it has and leaves out the figure the side result would give.
 */
export async function sideResult(
  input: Pick<SectionInput, "outDir" | "step">,
  suffix: string,
): Promise<ResultTable | undefined> {
  const r = await readResult(join(input.outDir, `${input.step.id}_${suffix}.json`));
  return r instanceof QuiverError ? undefined : r;
}

/** A numeric column the result must have; its absence is named ("no column … in <what>"). */
export function requiredColumn(
  r: ResultTable,
  name: string,
  what: string,
): TableColumn<Float64Array> {
  const c = numericColumn(r, name);
  if (c === undefined) {
    throw new QuiverError(`no column "${name}" in ${what}`, { file: r.file });
  }
  return c;
}
