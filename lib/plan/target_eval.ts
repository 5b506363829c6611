/**
 * Checking a plan's targets against the results its steps wrote.
 *
 * Quantities: `first_mode_hz` and `mode_hz` (mode `mode`, 1-based) from a
 * damping result, optionally of one `channel`; `overall_db` from a bands
 * result's overall level of `channel`; `leq_db` and `lmax_db` from a level
 * result's summary of `channel`; `pair_mac` and `pair_shift_percent` of the
 * pair of test mode `mode` (1-based) from a mac result (the shift as its
 * magnitude, so a `max` target bounds it either way). A limit curve checks the `channel` column
 * of any result against its first column (frequency, band centre or rpm),
 * in the column's own unit.
 *
 * @module
 */
import { join } from "node:path";
import { numericColumn, readResultFile, type ResultTable } from "../io/result_file.ts";
import { resultMetadata } from "../io/result_metadata.ts";
import { checkCurve, checkValue, type TargetResult } from "../compare/targets.ts";
import type { Plan, PlanTarget } from "./schema.ts";

/** A target's outcome: a result, or why it could not be checked. */
export type TargetOutcome = (TargetResult & { status: "checked" }) | {
  id: string;
  description: string;
  status: "not_checked";
  reason: string;
};

/**
 * A result value as a number, refusing what JSON holds for a value that is
 * missing or was not finite (`null`, from NaN or ±∞): such a target cannot be
 * checked, and reading it as 0 would give a verdict on nothing.
 */
function finiteValue(value: unknown, what: string): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new Error(
      `${what} is ${
        value === null || value === undefined ? "missing" : String(value)
      } in the result (not a finite number: a dead channel or a failed estimate?)`,
    );
  }
  return value;
}

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

function quantityOf(t: Extract<PlanTarget, { type: "min" | "max" }>, result: ResultTable): number {
  const { quantity, channel, mode } = t.of;
  if (quantity === "first_mode_hz" || quantity === "mode_hz") {
    const modes = resultMetadata(result, "damping").modes;
    // A mode whose frequency is missing sorts last and is refused by finiteValue if picked.
    const chosen = modes.filter((x) => channel === undefined || x.channel === channel)
      .sort((a, b) => (a.frequencyHz ?? Infinity) - (b.frequencyHz ?? Infinity));
    const pick = quantity === "first_mode_hz" ? chosen[0] : chosen[(mode ?? 1) - 1];
    if (pick === undefined) throw new Error("no such mode in the result");
    return finiteValue(pick.frequencyHz, "the mode frequency");
  }
  if (quantity === "overall_db") {
    const overall = resultMetadata(result, "bands").overall;
    const o = overall.find((x) => channel === undefined || x.channel === channel);
    if (o === undefined) throw new Error("no overall level for that channel");
    return finiteValue(o.level_db, "the overall level");
  }
  if (quantity === "pair_mac" || quantity === "pair_shift_percent") {
    const wanted = mode ?? 1;
    const pair = resultMetadata(result, "mac").pairs.find((p) => p.test_mode === wanted);
    if (pair === undefined) throw new Error(`test mode ${wanted} has no simulation pair`);
    if (quantity === "pair_mac") return finiteValue(pair.mac, "the pair's MAC");
    return Math.abs(finiteValue(pair.shift_percent, "the pair's frequency shift"));
  }
  const summary = resultMetadata(result, "level").summary;
  const s = summary.find((x) => channel === undefined || x.channel === channel);
  if (s === undefined) throw new Error("no level summary for that channel");
  return finiteValue(quantity === "leq_db" ? s.leq_db : s.lmax_db, quantity);
}

/** Checks every target; a target whose result is missing is reported as not checked. */
export async function evaluateTargets(
  plan: Plan,
  outDir: string,
  failed: ReadonlySet<string>,
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
        outcomes.push({
          ...checkValue({
            id: t.id,
            description,
            value: quantityOf(t, result),
            kind: t.type,
            limit: t.value,
            unit: t.unit,
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
