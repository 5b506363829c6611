/**
 * Checking a plan's targets against the results its steps wrote.
 *
 * Quantities: `first_mode_hz` (the lowest mode, of `channel` or of any
 * channel, never a candidate flagged `noise`; the outcome names the mode used
 * and the candidates passed over) and `mode_hz` (mode `mode`, 1-based, as
 * numbered in the damping table, of `channel`) from a damping result;
 * `overall_db` from a bands result's overall level of `channel`; `leq_db` and `lmax_db` from a level
 * result's summary of `channel`; `pair_mac` and `pair_shift_percent` of the
 * pair of test mode `mode` (1-based) from a mac result (the shift as its
 * magnitude, so a `max` target bounds it either way). A limit curve checks the `channel` column
 * of any result against its first column (frequency, band centre or rpm),
 * in the column's own unit. A result of several channels needs `channel`
 * (except for `first_mode_hz`): the target is not checked, and the reason
 * names the channels, rather than reading the first one.
 *
 * @module
 */
import { join } from "node:path";
import { numericColumn, readResultFile, type ResultTable } from "../io/result_file.ts";
import { resultMetadata } from "../io/result_metadata.ts";
import { checkCurve, checkValue, type TargetResult } from "../compare/targets.ts";
import type { Plan, PlanTarget } from "./schema.ts";
import { describeSkipped, firstMode, isMode } from "../modal/first_mode.ts";
import { formatNumber } from "../format_number.ts";

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

/**
 * The one channel a single-value target reads: `of.channel` when given, else
 * the result's only channel. A result of several channels without
 * `of.channel` is refused, naming them: taking the first would be a silent
 * choice.
 */
function oneChannel(
  channels: readonly string[],
  wanted: string | undefined,
  what: string,
): string | undefined {
  const distinct = [...new Set(channels)];
  if (wanted !== undefined) {
    if (!distinct.includes(wanted)) {
      throw new Error(
        `no ${what} for channel "${wanted}"; the result has ${
          distinct.length === 0 ? "none" : distinct.map((c) => `"${c}"`).join(", ")
        }`,
      );
    }
    return wanted;
  }
  if (distinct.length > 1) {
    throw new Error(
      `the result has ${distinct.length} channels (${
        distinct.map((c) => `"${c}"`).join(", ")
      }): name one in of.channel`,
    );
  }
  return distinct[0];
}

/** The value a single-value target checks, and for a mode, which mode it was. */
function quantityOf(
  t: Extract<PlanTarget, { type: "min" | "max" }>,
  result: ResultTable,
): { value: number; basis?: string } {
  const { quantity, channel, mode } = t.of;
  if (quantity === "first_mode_hz") {
    // The one rule of lib/modal/damping_analysis.ts: the lowest numbered mode, never a
    // candidate flagged noise; over every channel when none is named (the channel used is
    // said in the basis).
    const modes = resultMetadata(result, "damping").modes;
    if (channel !== undefined) oneChannel(modes.map((m) => m.channel), channel, "mode");
    const { used, skipped } = firstMode(modes, channel);
    const passedOver = describeSkipped(skipped);
    if (used === undefined) {
      throw new Error(`no mode in the result${passedOver === "" ? "" : `; ${passedOver}`}`);
    }
    const value = finiteValue(used.frequencyHz, "the mode frequency");
    return {
      value,
      basis: `judged on mode ${used.mode} of ${used.channel} at ${formatNumber(value, 5)} Hz${
        passedOver === "" ? "" : `; ${passedOver}`
      }`,
    };
  }
  if (quantity === "mode_hz") {
    const modes = resultMetadata(result, "damping").modes;
    const name = oneChannel(modes.map((m) => m.channel), channel, "mode");
    const wanted = mode ?? 1;
    const mine = modes.filter((m) => m.channel === name && isMode(m));
    const pick = mine.find((m) => m.mode === wanted);
    if (pick === undefined) {
      throw new Error(`no mode ${wanted} in "${name}" (it has ${mine.length} mode(s))`);
    }
    const value = finiteValue(pick.frequencyHz, "the mode frequency");
    return { value, basis: `judged on mode ${wanted} of ${name} at ${formatNumber(value, 5)} Hz` };
  }
  if (quantity === "overall_db") {
    const overall = resultMetadata(result, "bands").overall;
    const name = oneChannel(overall.map((x) => x.channel), channel, "overall level");
    const o = overall.find((x) => x.channel === name);
    if (o === undefined) throw new Error("no overall level in the result");
    return { value: finiteValue(o.level_db, "the overall level") };
  }
  if (quantity === "pair_mac" || quantity === "pair_shift_percent") {
    const wanted = mode ?? 1;
    const pair = resultMetadata(result, "mac").pairs.find((p) => p.test_mode === wanted);
    if (pair === undefined) throw new Error(`test mode ${wanted} has no simulation pair`);
    // A pair the shapes do not tell apart from its rival is no basis for a verdict: a PASS
    // on it may be a PASS on the wrong mode.
    if (pair.ambiguous === true) {
      const rival = pair.rival;
      throw new Error(
        `the pair of test mode ${wanted} with simulation mode ${pair.simulation_mode} (MAC ${
          formatNumber(pair.mac, 3)
        }) is ambiguous${
          rival !== undefined && rival !== null
            ? `: ${rival.side} mode ${rival.mode} matches almost as well (MAC ${
              formatNumber(rival.mac, 3)
            })`
            : ""
        }; more points or directions in the shapes would tell them apart`,
      );
    }
    if (quantity === "pair_mac") return { value: finiteValue(pair.mac, "the pair's MAC") };
    return { value: Math.abs(finiteValue(pair.shift_percent, "the pair's frequency shift")) };
  }
  const summary = resultMetadata(result, "level").summary;
  const name = oneChannel(summary.map((x) => x.channel), channel, "level summary");
  const s = summary.find((x) => x.channel === name);
  if (s === undefined) throw new Error("no level summary in the result");
  return { value: finiteValue(quantity === "leq_db" ? s.leq_db : s.lmax_db, quantity) };
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
        const { value, basis } = quantityOf(t, result);
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
