/**
 * Checking a plan's targets against the results its steps wrote.
 *
 * Single-value targets read their quantity with the reader the analysis
 * giving it declares in its descriptor (lib/analyses.ts): `first_mode_hz`
 * and `mode_hz` from a damping result, `overall_db` from bands, `leq_db` and
 * `lmax_db` from level, `pair_mac` and `pair_shift_percent` from mac. A
 * limit curve checks the `channel` column of any result against its first
 * column (frequency, band centre or rpm), in the column's own unit. A result
 * of several channels needs `channel` (except for `first_mode_hz`): the
 * target is not checked, and the reason names the channels, rather than
 * reading the first one.
 *
 * @module
 */
import { join } from "node:path";
import { numericColumn, readResultFile, type ResultTable } from "../io/result_file.ts";
import { checkCurve, checkValue, type TargetResult } from "../compare/targets.ts";
import type { Plan, PlanTarget } from "./schema.ts";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import type { QuantityValue } from "../quantity_reading.ts";

/** A target's outcome: a result, or why it could not be checked. */
export type TargetOutcome = (TargetResult & { status: "checked" }) | {
  id: string;
  description: string;
  status: "not_checked";
  reason: string;
};

function describe(t: PlanTarget): string {
  if (t.description !== undefined) return t.description;
  if (t.type === "limit_curve") {
    return `${t.of.channel} of ${t.of.analysis}: ${
      t.limit === "max" ? "at most" : "at least"
    } the limit curve`;
  }
  return `${t.of.quantity}${
    t.of.channel !== undefined ? ` of ${t.of.channel}` : ""
  } in ${t.of.analysis} ${t.type === "min" ? "≥" : "≤"} ${t.value} ${t.unit}`;
}

/**
 * The value a single-value target checks, and for a mode, which mode it
 * was: read by its quantity's reader, from the descriptor of the analysis
 * that gives the quantity.
 */
async function quantityOf(
  t: Extract<PlanTarget, { type: "min" | "max" }>,
  result: ResultTable,
  table: AnalysisTable,
): Promise<QuantityValue> {
  const { quantity, channel, mode, order, frequency_hz } = t.of;
  const read = table.quantity(quantity);
  // The plan's schema takes only the table's quantities: this is a plan checked against another.
  if (read === undefined) throw new Error(`no analysis gives the quantity "${quantity}"`);
  return await read(result, {
    ...(channel !== undefined ? { channel } : {}),
    ...(mode !== undefined ? { mode } : {}),
    ...(order !== undefined ? { order } : {}),
    ...(frequency_hz !== undefined ? { frequencyHz: frequency_hz } : {}),
  });
}

/**
 * Checks every target; a target whose result is missing is reported as not
 * checked. The quantities are those of the analyses of `table` (quiver's by default).
 */
export async function evaluateTargets(
  plan: Plan,
  outDir: string,
  failed: ReadonlySet<string>,
  table: AnalysisTable = ANALYSES,
): Promise<TargetOutcome[]> {
  const outcomes: TargetOutcome[] = [];
  for (const t of plan.targets) {
    const description = describe(t);
    if (failed.has(t.of.analysis)) {
      outcomes.push({
        id: t.id,
        description,
        status: "not_checked",
        reason: `analysis "${t.of.analysis}" failed`,
      });
      continue;
    }
    try {
      const result = await readResultFile(join(outDir, `${t.of.analysis}.json`));
      if (t.type === "limit_curve") {
        const column = numericColumn(result, t.of.channel);
        const first = result.columns[0];
        if (column === undefined) {
          throw new Error(`no numeric column "${t.of.channel}" in the result`);
        }
        if (!(first?.values instanceof Float64Array)) {
          throw new Error("the result's first column is not numeric");
        }
        // Values that were not finite read as NaN, never 0; checkCurve refuses them.
        outcomes.push({
          ...checkCurve({
            id: t.id,
            description,
            frequencies: first.values,
            levels: column.values,
            kind: t.limit,
            points: t.points,
            unit: t.unit || column.unit,
            // A band result names its bands by their nominal frequencies.
            ...(numericColumn(result, "nominal_hz") !== undefined
              ? { nominal: numericColumn(result, "nominal_hz")!.values }
              : {}),
          }),
          status: "checked",
        });
      } else {
        const { value, basis } = await quantityOf(t, result, table);
        outcomes.push({
          ...checkValue({
            id: t.id,
            // The mode judged is shown wherever the description is (manifest, report).
            description: basis === undefined ? description : `${description} (${basis})`,
            value,
            kind: t.type,
            limit: t.value,
            unit: t.unit,
            ...(basis !== undefined ? { basis } : {}),
          }),
          status: "checked",
        });
      }
    } catch (error) {
      outcomes.push({
        id: t.id,
        description,
        status: "not_checked",
        reason: (error as Error).message,
      });
    }
  }
  return outcomes;
}
