/**
 * Reading a plan file and checking all of it before any work: the schema
 * (errors name the key path and what was expected), then the steps
 * (plan_steps.ts). Every problem is named at once, in plan order, in one
 * usage error.
 *
 * @module
 */
import { readFile } from "node:fs/promises";
import { resolve } from "node:path";
import { QuiverError } from "../errors.ts";
import { assertRegularFile } from "../io/file_kinds.ts";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import { draftOfPlan, type Plan, readPlanJson } from "./schema.ts";
import { checkSteps, type PlanStep } from "./plan_steps.ts";
import type { PlanCommand } from "./step_options.ts";

/** Reads a plan file's JSON (a usage error when it cannot be read or is not JSON). */
async function readPlanFile(path: string): Promise<{ json: unknown; text: string }> {
  let text: string;
  try {
    assertRegularFile(path, "plan");
    text = await readFile(path, "utf8");
  } catch (error) {
    if (error instanceof QuiverError) throw error;
    throw new QuiverError("cannot read the plan: no such file", { file: resolve(path) }, "usage");
  }
  try {
    return { json: JSON.parse(text), text };
  } catch (error) {
    throw new QuiverError(
      `the plan is not valid JSON: ${(error as Error).message}`,
      { file: path },
      "usage",
    );
  }
}

/**
 * Reads and validates a plan file's JSON against the schema of the analyses
 * of `table` (quiver's by default); every schema problem is named with its
 * key path and what was expected. The checks of references, files and
 * options are {@linkcode checkPlan}'s.
 */
export async function loadPlan(
  path: string,
  table: AnalysisTable = ANALYSES,
): Promise<{ plan: Plan; text: string }> {
  const { json, text } = await readPlanFile(path);
  const { plan, problems } = readPlanJson(json, table);
  if (plan === undefined) throw planProblems(problems, path);
  return { plan, text };
}

/** Options of {@linkcode checkPlan}. */
export interface CheckOptions {
  /** Files written besides the manifest, the steps' outputs and the report. Default: none. */
  readonly also?: readonly string[];
  /** The analyses. Default: quiver's (lib/analyses.ts). */
  readonly table?: AnalysisTable;
}

/**
 * Reads a plan file and checks all of it before any work: the schema, the
 * references between steps, recordings and targets, every input file, each
 * step's options against its command's own schema, and every path the
 * campaign writes. All problems are named at once, each with its key path
 * and what is allowed (the nearest name when there is one), and none
 * follows from another: an item that fails its schema, or a step with a bad
 * option, still counts as there for the references to it.
 *
 * @throws {QuiverError} (usage) naming every problem.
 */
export async function checkPlan(
  path: string,
  outDir: string,
  commands: Readonly<Record<string, PlanCommand>>,
  { also = [], table = ANALYSES }: CheckOptions = {},
): Promise<{ plan: Plan; text: string; steps: PlanStep[] }> {
  const { json, text } = await readPlanFile(path);
  const { plan, draft, problems } = readPlanJson(json, table);
  const checked = checkSteps(draft, { planFile: resolve(path), outDir, commands, also, table });
  const all = [...problems, ...checked.problems];
  if (plan === undefined || all.length > 0) throw planProblems(all, path);
  return { plan, text, steps: checked.steps };
}

/**
 * The steps of a plan with their arguments and output paths, after checking
 * references, input files, every step's options and every path the campaign
 * writes (`checkCampaignPaths`; `also` names files written besides the
 * manifest, the steps' outputs and the report, such as a shard's manifest).
 * Throws before any work, naming every problem.
 */
export function planSteps(
  plan: Plan,
  planFile: string,
  outDir: string,
  commands: Readonly<Record<string, PlanCommand>>,
  { also = [], table = ANALYSES }: CheckOptions = {},
): PlanStep[] {
  const { steps, problems } = checkSteps(draftOfPlan(plan), {
    planFile,
    outDir,
    commands,
    also,
    table,
  });
  if (problems.length > 0) throw planProblems(problems, planFile);
  return steps;
}

/** Where a key path stands in the plan: its section, then its index, for sorting problems. */
function planOrder(where: string): [number, number] {
  const sections = [
    "(top level)",
    "quiver_plan",
    "title",
    "description",
    "recordings",
    "analyses",
    "comparisons",
    "targets",
    "require_targets",
    "report",
  ];
  const section = /^[a-z_]+/.exec(where)?.[0] ?? where;
  const rank = sections.indexOf(section);
  const index = Number(/^[a-z_]+\[(\d+)\]/.exec(where)?.[1] ?? -1);
  return [rank < 0 ? sections.length : rank, index];
}

/** One usage error naming every problem of a plan, one per line after the first, in plan order. */
function planProblems(problems: readonly [string, string][], file: string): QuiverError {
  const sorted = problems.map((p, k) => ({ p, k, o: planOrder(p[0]) })).sort((a, b) =>
    a.o[0] - b.o[0] || a.o[1] - b.o[1] || a.k - b.k
  );
  const lines = sorted.map(({ p }) => `plan key ${p[0]}: ${p[1]}`);
  return new QuiverError(
    lines.length === 1
      ? lines[0]
      : `the plan has ${lines.length} problems:\n  ${lines.join("\n  ")}`,
    { file },
    "usage",
  );
}
