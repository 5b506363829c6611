/**
 * The files a campaign reads and writes, gathered from a plan and its steps
 * for the one check of every path (campaign_paths.ts `checkCampaignPaths`).
 *
 * @module
 */
import { basename, dirname, isAbsolute, join } from "node:path";
import { realPathOf } from "../io/output_paths.ts";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import {
  type CampaignInput,
  type CampaignWrite,
  checkCampaignPaths,
  FIGURES_FOLDER,
  MANIFEST_FILE,
  sideOutputNote,
} from "./campaign_paths.ts";
import { type PlanDraft, stepFile } from "./schema.ts";
import type { PlanStep } from "./plan_steps.ts";

/**
 * Every file the plan reads: the plan, recordings, set-ups, simulations and
 * the files steps name (`table.planFiles`: geometry, simulation, map).
 */
export function planInputs(
  plan: PlanDraft,
  planFile: string,
  table: AnalysisTable = ANALYSES,
): CampaignInput[] {
  const base = dirname(planFile);
  const at = (p: string) => (isAbsolute(p) ? p : join(base, p));
  const inputs: CampaignInput[] = [{ path: planFile, what: "the plan itself" }];
  for (const [name, rec] of plan.recordings) {
    inputs.push({ path: at(rec.file), what: `recordings.${name}.file` });
    if (rec.setup !== undefined) {
      inputs.push({ path: at(rec.setup), what: `recordings.${name}.setup` });
    }
  }
  plan.comparisons.forEach((item, i) => {
    if (!item.ok) return;
    const c = item.value;
    inputs.push({ path: at(c.simulation.file), what: `comparisons[${i}].simulation.file` });
  });
  plan.analyses.forEach((item, i) => {
    if (!item.ok) return;
    for (const key of table.planFiles) {
      const file = stepFile(item.value, key);
      if (file !== undefined) inputs.push({ path: at(file), what: `analyses[${i}].${key}.file` });
    }
  });
  return inputs;
}

/**
 * The campaign's writes and inputs, checked by `checkCampaignPaths`: the
 * manifest (and any `also`), every step's outputs, the report and its
 * figures, against the plan, its recordings and every file it names. A
 * comparison's simulation that is another comparison's result is named as such.
 */
export function campaignPathProblems(
  plan: PlanDraft,
  planFile: string,
  outDir: string,
  steps: readonly PlanStep[],
  also: readonly string[],
  table: AnalysisTable = ANALYSES,
): [string, string][] {
  const writes: CampaignWrite[] = [
    { path: join(outDir, MANIFEST_FILE), who: "the manifest", where: "(output folder)" },
    ...also.map((path) => ({ path, who: "the run", where: "(output folder)" })),
  ];
  for (const step of steps) {
    for (const [key, path] of Object.entries(step.outputs)) {
      const why = sideOutputNote(step.id, key, basename(path));
      writes.push({
        path,
        who: `step "${step.id}" (${key})`,
        where: `${step.where}.id`,
        ...(why !== undefined ? { why } : {}),
      });
    }
  }
  if (plan.report !== undefined) {
    writes.push({ path: join(outDir, plan.report.file), who: "the report", where: "report.file" });
    // The figures' names come from step ids; one stands for all (a link out of figures/ shows).
    writes.push({
      path: join(outDir, FIGURES_FOLDER, "figure.svg"),
      who: "the report's figures",
      where: "report",
    });
  }
  const base = dirname(planFile);
  const at = (p: string) => (isAbsolute(p) ? p : join(base, p));
  const problems: [string, string][] = [];
  const comparisonOutputs = new Map<string, string>(); // real path → comparison id
  for (const step of steps) {
    if (step.kind !== "comparison") continue;
    for (const path of Object.values(step.outputs)) {
      comparisonOutputs.set(realPathOf(path), step.id);
    }
  }
  const clash = new Set<string>();
  plan.comparisons.forEach((item, i) => {
    if (!item.ok) return;
    const c = item.value;
    const other = comparisonOutputs.get(realPathOf(at(c.simulation.file)));
    if (other !== undefined) {
      clash.add(`comparisons[${i}].simulation.file`);
      problems.push([
        `comparisons[${i}].simulation.file`,
        `${c.simulation.file} is the result of comparison "${other}"; comparison "${c.id}" must compare with a simulation, not another comparison`,
      ]);
    }
  });
  const inputs = planInputs(plan, planFile, table).filter((input) => !clash.has(input.what));
  return [...problems, ...checkCampaignPaths(outDir, writes, inputs)];
}
