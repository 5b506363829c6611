/**
 * The steps of a plan, with their arguments and output paths, built after
 * checking references between steps, input files, every step's options and
 * every path the campaign writes. Every problem is collected (none stops
 * the others being found), so that one check names them all; each step's
 * reads and outputs come from its analysis's descriptor (lib/analyses.ts).
 *
 * @module
 */
import { statSync } from "node:fs";
import { dirname, isAbsolute, join } from "node:path";
import { fileKind } from "../io/file_kinds.ts";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import { didYouMeanClause } from "../nearest_name.ts";
import { outputFileName, outputKeys, outputWrites } from "./campaign_paths.ts";
import { campaignPathProblems } from "./campaign_files.ts";
import { optionsToArgv, type PlanDraft } from "./schema.ts";
import { checkArguments, type PlanCommand, usableOptions } from "./step_options.ts";
import { readStep, type StepArguments, type StepContext } from "./step_reads.ts";

/** One step as the runner will execute it. */
export interface PlanStep {
  readonly id: string;
  readonly kind: "analysis" | "comparison";
  readonly command: string;
  readonly argv: string[];
  readonly inputs: string[];
  readonly outputs: Record<string, string>;
  readonly needs: string[];
  /** Key path of the step in the plan, for messages. */
  readonly where: string;
}

/** What {@linkcode checkSteps} needs besides the plan. */
export interface StepChecks {
  /** The plan file (its folder resolves the plan's paths). */
  readonly planFile: string;
  /** The output folder. */
  readonly outDir: string;
  /** The commands by name. */
  readonly commands: Readonly<Record<string, PlanCommand>>;
  /** Files written besides the manifest, the steps' outputs and the report (a shard's manifest). */
  readonly also?: readonly string[];
  /** The analyses. Default: quiver's (lib/analyses.ts). */
  readonly table?: AnalysisTable;
}

/**
 * The steps of a plan's draft, and every problem found: references between
 * steps, recordings and targets, input files, each step's options against
 * its command's own check, and every path the campaign writes
 * (`checkCampaignPaths`). An item that failed its schema still holds its
 * id, so that references to it are no second problem.
 */
export function checkSteps(
  draft: PlanDraft,
  { planFile, outDir, commands, also = [], table = ANALYSES }: StepChecks,
): { steps: PlanStep[]; problems: [string, string][] } {
  const problems: [string, string][] = [];
  const note = (where: string, detail: string) => {
    problems.push([where, detail]);
  };
  const base = dirname(planFile);
  const at = (p: string) => (isAbsolute(p) ? p : join(base, p));
  const steps: PlanStep[] = [];
  const comparison = table.comparison;
  // id → its command (undefined when the step's own entry is broken), its kind and where it stands.
  const known = new Map<
    string,
    { command: string | undefined; kind: PlanStep["kind"]; where: string }
  >();
  const allIds = new Set<string>();
  for (const list of [draft.analyses, draft.comparisons]) {
    for (const item of list) {
      const id = item.ok ? item.value.id : item.id;
      if (id !== undefined) allIds.add(id);
    }
  }
  const context: StepContext = {
    draft,
    outDir,
    table,
    at,
    note,
    // An input must be a regular file: a FIFO or /dev/zero would hang the hash that records it.
    inputFile(path, shown, where) {
      let stats;
      try {
        stats = statSync(path);
      } catch {
        note(where, `no such file: ${shown}`);
        return false;
      }
      if (!stats.isFile()) {
        note(where, `${shown} is ${fileKind(stats)}; an input must be a regular file`);
        return false;
      }
      return true;
    },
    earlier(ref, where, accept) {
      const what = `${accept.join(" or ")} analysis`;
      const step = known.get(ref);
      if (step === undefined) {
        note(
          where,
          allIds.has(ref)
            ? `"${ref}" is not an earlier ${what}: it comes later in the plan, and a step takes only earlier steps' results`
            : `"${ref}" is not an earlier ${what}: no step has this id${
              didYouMeanClause(ref, [...known.keys()])
            }`,
        );
        return false;
      }
      if (step.command === undefined) return false;
      if (!accept.includes(step.command)) {
        note(where, `"${ref}" is not an earlier ${what}: it is a ${step.command} step`);
        return false;
      }
      return true;
    },
    commandOf: (ref) => known.get(ref)?.command,
  };
  for (const [name, rec] of draft.recordings) {
    context.inputFile(at(rec.file), rec.file, `recordings.${name}.file`);
    if (rec.setup !== undefined) {
      context.inputFile(at(rec.setup), rec.setup, `recordings.${name}.setup`);
    }
  }
  /** Registers a step's id; false (and a problem) when an earlier step has it. */
  const claimId = (
    id: string,
    command: string | undefined,
    kind: PlanStep["kind"],
    where: string,
  ): boolean => {
    const other = known.get(id);
    if (other !== undefined) {
      note(`${where}.id`, `"${id}" is used twice (${other.where}.id has it too): ids must differ`);
      return false;
    }
    known.set(id, { command, kind, where });
    return true;
  };
  /** The paths of a step's outputs, named from its id. */
  const outputsOf = (id: string, command: string, options: Readonly<Record<string, unknown>>) => {
    const descriptor = table.get(command);
    const outputs: Record<string, string> = {};
    for (const key of outputKeys(descriptor, options)) {
      outputs[key] = join(outDir, outputFileName(id, key, outputWrites(descriptor, key)));
    }
    return outputs;
  };
  draft.analyses.forEach((item, i) => {
    const where = `analyses[${i}]`;
    if (!item.ok) {
      // Its own problems are named by the schema; it still holds its id.
      if (item.id !== undefined) {
        const command = table.planCommands.includes(item.command ?? "") ? item.command : undefined;
        claimId(item.id, command, "analysis", where);
      }
      return;
    }
    const a = item.value;
    const unique = claimId(a.id, a.command, "analysis", where);
    const args: StepArguments = { argv: [], inputs: [], needs: [], withheld: new Set() };
    const options = usableOptions(a.options, a.command, where, commands, note);
    const plan = table.get(a.command)?.plan;
    if (plan?.step === "analysis") readStep(context, a, where, plan.reads, options, args);
    const outputs = outputsOf(a.id, a.command, options);
    const argv = [...args.argv, ...optionsToArgv(options)];
    for (const [key, path] of Object.entries(outputs)) argv.push(`--${key}`, path);
    checkArguments(where, a.command, argv, commands, note, args.withheld);
    // A step whose id another step has writes nothing of its own: no second clash on its files.
    if (unique) {
      steps.push({
        id: a.id,
        kind: "analysis",
        command: a.command,
        argv,
        inputs: args.inputs,
        outputs,
        needs: args.needs,
        where,
      });
    }
  });
  draft.comparisons.forEach((item, i) => {
    const where = `comparisons[${i}]`;
    if (!item.ok) {
      if (item.id !== undefined) claimId(item.id, comparison, "comparison", where);
      return;
    }
    const c = item.value;
    const unique = claimId(c.id, comparison, "comparison", where);
    if (comparison === undefined) {
      note(where, "these analyses have no comparison command");
      return;
    }
    const options = usableOptions(c.options, comparison, where, commands, note);
    const test = join(outDir, outputFileName(c.test, "out"));
    const testKnown = known.get(c.test);
    if (testKnown === undefined) {
      note(
        `${where}.test`,
        `no analysis "${c.test}"${
          allIds.has(c.test)
            ? ": it comes later in the plan, and a comparison takes only earlier analyses"
            : didYouMeanClause(c.test, [...known.keys()])
        }`,
      );
    } else if (testKnown.kind === "comparison") {
      note(
        `${where}.test`,
        `"${c.test}" is a comparison; comparison "${c.id}" must take the curve of an analysis`,
      );
    }
    const sim = at(c.simulation.file);
    context.inputFile(sim, c.simulation.file, `${where}.simulation.file`);
    const outputs = outputsOf(c.id, comparison, options);
    const argv = [test, sim, ...optionsToArgv(options)];
    if (c.test_column !== undefined) argv.push("--test-column", c.test_column);
    if (c.simulation.column !== undefined) argv.push("--sim-column", c.simulation.column);
    for (const [key, path] of Object.entries(outputs)) argv.push(`--${key}`, path);
    checkArguments(where, comparison, argv, commands, note);
    if (unique) {
      steps.push({
        id: c.id,
        kind: "comparison",
        command: comparison,
        argv,
        inputs: [test, sim],
        outputs,
        needs: [c.test],
        where,
      });
    }
  });
  const targetIds = new Map<string, string>();
  draft.targets.forEach((item, i) => {
    const where = `targets[${i}]`;
    const id = item.ok ? item.value.id : item.id;
    if (id !== undefined) {
      const other = targetIds.get(id);
      if (other !== undefined) {
        note(
          `${where}.id`,
          `"${id}" is used twice (${other}.id has it too): target ids must differ`,
        );
      } else targetIds.set(id, where);
    }
    if (!item.ok) return;
    const ref = item.value.of.analysis;
    if (!known.has(ref)) {
      note(
        `${where}.of.analysis`,
        `no analysis "${ref}"${didYouMeanClause(ref, [...known.keys()])}`,
      );
    }
  });
  problems.push(...campaignPathProblems(draft, planFile, outDir, steps, also, table));
  return { steps, problems };
}
