/**
 * Running a plan: validate everything first, then run each analysis and
 * comparison in order with its command, check the targets, write the
 * manifest and (when the plan asks) the report.
 *
 * Validation before any work: the plan's schema (errors name the key path),
 * references between steps, the existence of every input file, and each
 * step's options against its command's own option schema.
 *
 * Fault isolation: a step that fails is recorded in the manifest with its
 * error; steps that need its output are skipped with the reason; the others
 * still run. The manifest's `status` and the caller's exit code say so.
 *
 * @module
 */
import { type FileRecord, type Manifest, manifestSchema } from "./manifest.ts";
export type { FileRecord, Manifest } from "./manifest.ts";
import { acquireFolderLock } from "./folder_lock.ts";
import { assignShards, type Shard, shardManifestName } from "./shards.ts";
import {
  type CampaignInput,
  type CampaignWrite,
  checkCampaignPaths,
  FIGURES_FOLDER,
  isFigureName,
  isReportFileName,
  MANIFEST_FILE,
  outputFileName,
  outputKeys,
  sideOutputNote,
} from "./campaign_paths.ts";
export { MANIFEST_FILE } from "./campaign_paths.ts";
import { realPathOf } from "../io/output_paths.ts";
import { createHash } from "node:crypto";
import { existsSync, lstatSync, statSync } from "node:fs";
import { assertRegularFile, fileKind } from "../io/file_kinds.ts";
import { mkdir, open, readdir, readFile, rm, rmdir } from "node:fs/promises";
import process from "node:process";
import { dirname, isAbsolute, join, relative, resolve, sep } from "node:path";
import { QuiverError } from "../errors.ts";
import { sha256Hex } from "../io/table_file.ts";
import { writeFileAtomic } from "../io/atomic_write.ts";
import { QUIVER_VERSION } from "../version.ts";
import {
  didYouMean,
  draftOfPlan,
  type Nearest,
  optionsToArgv,
  type OptionValue,
  type Plan,
  PLAN_COMMANDS,
  type PlanDraft,
  readPlanJson,
} from "./schema.ts";
export type { Nearest } from "./schema.ts";
import { createProgress, type Progress } from "./progress.ts";
import { evaluateTargets } from "./target_eval.ts";

/** One problem a command finds in a step's arguments: the option (without dashes) and why. */
export interface PlanOptionProblem {
  /** The option at fault; undefined for a problem of several options or of none. */
  readonly option?: string;
  readonly message: string;
}

/** What the runner needs of a command: a dry check of its arguments, and a run. */
export interface PlanCommand {
  /** Parses and validates `argv` as the command would; throws on bad options. */
  validate(argv: readonly string[]): void;
  /**
   * Every problem of `argv`, one per option, none when it would run; when
   * absent, `validate`'s first complaint is used.
   */
  problems?(argv: readonly string[]): PlanOptionProblem[];
  /** The command's option names (without dashes), to name an unknown one; absent: not checked. */
  readonly optionNames?: readonly string[];
  /** Runs the command with `argv`. */
  run(argv: readonly string[]): Promise<void>;
}

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
 * Reads and validates a plan file's JSON against the schema; every schema
 * problem is named with its key path and what was expected (`nearest`
 * suggests names). The checks of references, files and options are
 * {@linkcode checkPlan}'s.
 */
export async function loadPlan(
  path: string,
  nearest?: Nearest,
): Promise<{ plan: Plan; text: string }> {
  const { json, text } = await readPlanFile(path);
  const { plan, problems } = readPlanJson(json, nearest);
  if (plan === undefined) throw planProblems(problems, path);
  return { plan, text };
}

/**
 * Reads a plan file and checks all of it before any work: the schema, the
 * references between steps, recordings and targets, every input file, each
 * step's options against its command's own schema, and every path the
 * campaign writes. All problems are named at once, each with its key path
 * and what is allowed (the nearest name when `nearest` finds one), and none
 * follows from another: an item that fails its schema, or a step with a bad
 * option, still counts as there for the references to it.
 *
 * @throws {QuiverError} (usage) naming every problem.
 */
export async function checkPlan(
  path: string,
  outDir: string,
  commands: Readonly<Record<string, PlanCommand>>,
  { also = [], nearest }: { also?: readonly string[]; nearest?: Nearest } = {},
): Promise<{ plan: Plan; text: string; steps: PlanStep[] }> {
  const { json, text } = await readPlanFile(path);
  const { plan, draft, problems } = readPlanJson(json, nearest);
  const checked = checkSteps(draft, resolve(path), outDir, commands, also, nearest);
  const all = [...problems, ...checked.problems];
  if (plan === undefined || all.length > 0) throw planProblems(all, path);
  return { plan, text, steps: checked.steps };
}

/** Thrown inside plan validation to skip the rest of one check once a problem is noted. */
const SKIP = Symbol("skip");

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
  also: readonly string[] = [],
  nearest?: Nearest,
): PlanStep[] {
  const { steps, problems } = checkSteps(
    draftOfPlan(plan),
    planFile,
    outDir,
    commands,
    also,
    nearest,
  );
  if (problems.length > 0) throw planProblems(problems, planFile);
  return steps;
}

/** The option names a runner gives itself or refuses: not offered as suggestions. */
function isRunnerOption(name: string): boolean {
  return name === "out" || name === "format" || name.endsWith("-out") || name === "help" ||
    name === "debug";
}

/** The checks of {@linkcode planSteps} on a draft: the steps, and every problem found. */
function checkSteps(
  draft: PlanDraft,
  planFile: string,
  outDir: string,
  commands: Readonly<Record<string, PlanCommand>>,
  also: readonly string[],
  nearest: Nearest | undefined,
): { steps: PlanStep[]; problems: [string, string][] } {
  // Every problem is collected, so that one run of validation names them all.
  const problems: [string, string][] = [];
  const fail = (where: string, detail: string): never => {
    problems.push([where, detail]);
    throw SKIP;
  };
  // Notes a problem and goes on, so that every problem of one item is named.
  const note = (where: string, detail: string) => {
    problems.push([where, detail]);
  };
  const each = (check: () => void) => {
    try {
      check();
    } catch (error) {
      if (error !== SKIP) throw error;
    }
  };
  const base = dirname(planFile);
  const at = (p: string) => (isAbsolute(p) ? p : join(base, p));
  const steps: PlanStep[] = [];
  // id → its command (undefined when the step's own entry is broken) and where it stands.
  const known = new Map<string, { command: string | undefined; where: string }>();
  const allIds = new Set<string>();
  for (const list of [draft.analyses, draft.comparisons]) {
    for (const item of list) {
      const id = item.ok ? item.value.id : item.id;
      if (id !== undefined) allIds.add(id);
    }
  }
  const recordingNames = [...draft.recordings.keys(), ...draft.brokenRecordings];
  // An input must be a regular file: a FIFO or /dev/zero would hang the hash that records it.
  const inputFile = (path: string, shown: string, where: string) => {
    let stats;
    try {
      stats = statSync(path);
    } catch {
      fail(where, `no such file: ${shown}`);
    }
    if (!stats!.isFile()) {
      fail(where, `${shown} is ${fileKind(stats!)}; an input must be a regular file`);
    }
  };
  for (const [name, rec] of draft.recordings) {
    each(() => {
      inputFile(at(rec.file), rec.file, `recordings.${name}.file`);
    });
    each(() => {
      if (rec.setup !== undefined) inputFile(at(rec.setup), rec.setup, `recordings.${name}.setup`);
    });
  }
  /** Registers a step's id; false (and a problem) when an earlier step has it. */
  const claimId = (id: string, command: string | undefined, where: string): boolean => {
    const other = known.get(id);
    if (other !== undefined) {
      note(`${where}.id`, `"${id}" is used twice (${other.where}.id has it too): ids must differ`);
      return false;
    }
    known.set(id, { command, where });
    return true;
  };
  /**
   * Whether `ref` names an earlier step whose command is one of `accept`;
   * notes why not, except for a step whose own entry is broken (named already).
   */
  const earlier = (ref: string, where: string, accept: readonly string[], what: string) => {
    const step = known.get(ref);
    if (step === undefined) {
      note(
        where,
        allIds.has(ref)
          ? `"${ref}" is not an earlier ${what}: it comes later in the plan, and a step takes only earlier steps' results`
          : `"${ref}" is not an earlier ${what}: no step has this id${
            didYouMean(ref, [...known.keys()], nearest)
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
  };
  /** The options the command will see: those refused or unknown are named and left out. */
  const usableOptions = (
    options: Readonly<Record<string, OptionValue>>,
    command: string,
    where: string,
  ): Record<string, OptionValue> => {
    const refused = refuseOutputOptions(options, where, note);
    const names = Object.hasOwn(commands, command) ? commands[command].optionNames : undefined;
    const usable: Record<string, OptionValue> = {};
    for (const [key, value] of Object.entries(options)) {
      if (refused.has(key)) continue;
      if (names !== undefined && !names.includes(key)) {
        const offered = names.filter((n) => !isRunnerOption(n));
        const near = nearest?.(key, offered);
        note(
          `${where}.options.${key}`,
          `${command} has no option "${key}"${
            near !== undefined
              ? `; did you mean "${near}"?`
              : ` (its options: ${offered.join(", ")})`
          }`,
        );
        continue;
      }
      usable[key] = value;
    }
    return usable;
  };
  /** The command's own check of the arguments, each problem at its option's key path. */
  const check = (
    where: string,
    command: string,
    argv: string[],
    given: ReadonlySet<string> = new Set(),
  ) => {
    const c = Object.hasOwn(commands, command) ? commands[command] : undefined;
    if (c === undefined) {
      note(`${where}.command`, `unknown command "${command}"`);
      return;
    }
    let found: PlanOptionProblem[];
    if (c.problems !== undefined) found = c.problems(argv);
    else {
      try {
        c.validate(argv);
        found = [];
      } catch (error) {
        const message = error instanceof Error ? error.message : String(error);
        found = [{ option: /--([a-z0-9-]+)/i.exec(message)?.[1], message }];
      }
    }
    for (const p of found) {
      // An option the runner gives from a reference that failed: that failure is named already.
      if (p.option !== undefined && given.has(p.option)) continue;
      note(p.option !== undefined ? `${where}.options.${p.option}` : `${where}.options`, p.message);
    }
  };
  draft.analyses.forEach((item, i) => {
    const where = `analyses[${i}]`;
    if (!item.ok) {
      // Its own problems are named by the schema; it still holds its id.
      if (item.id !== undefined) {
        claimId(
          item.id,
          (PLAN_COMMANDS as readonly string[]).includes(item.command ?? "")
            ? item.command
            : undefined,
          where,
        );
      }
      return;
    }
    const a = item.value;
    const unique = claimId(a.id, a.command, where);
    const argv: string[] = [];
    const inputs: string[] = [];
    const needs: string[] = [];
    const options = usableOptions(a.options, a.command, where);
    const frfSource = "frf or hammer analysis";
    // Options the runner would give from references that failed (named there, not again).
    const withheld = new Set<string>();
    each(() => {
      if (a.command === "modal") {
        const sources = a.inputs ?? (a.input !== undefined ? [a.input] : []);
        if (sources.length === 0) {
          note(`${where}.inputs`, "modal needs the ids of frf or hammer analyses");
        }
        sources.forEach((source, k) => {
          const where_ = a.inputs !== undefined ? `${where}.inputs[${k}]` : `${where}.input`;
          if (!earlier(source, where_, ["frf", "hammer"], frfSource)) return;
          const path = join(outDir, outputFileName(source, "out"));
          argv.push(path);
          inputs.push(path);
          needs.push(source);
        });
        if (a.geometry !== undefined) {
          const file = at(a.geometry.file);
          each(() => inputFile(file, a.geometry!.file, `${where}.geometry.file`));
          argv.push("--geometry", file);
          inputs.push(file);
        }
      } else if (a.command === "mac") {
        if (a.input === undefined) {
          note(`${where}.input`, "mac needs the id of an earlier modal analysis");
        } else if (earlier(a.input, `${where}.input`, ["modal"], "modal analysis")) {
          const shapes = join(outDir, outputFileName(a.input, "shapes-out"));
          argv.push(shapes);
          inputs.push(shapes);
          needs.push(a.input);
        }
        if (a.simulation === undefined) {
          note(`${where}.simulation.file`, "mac needs the simulation's mode shapes");
        } else {
          const sim = at(a.simulation.file);
          each(() => inputFile(sim, a.simulation!.file, `${where}.simulation.file`));
          argv.push(sim);
          inputs.push(sim);
        }
        if (a.map !== undefined) {
          const map = at(a.map.file);
          each(() => inputFile(map, a.map!.file, `${where}.map.file`));
          argv.push("--map", map);
          inputs.push(map);
        }
      } else if (a.command === "damping") {
        if (a.input === undefined) {
          note(`${where}.input`, "damping needs the id of an frf or hammer analysis");
        } else if (earlier(a.input, `${where}.input`, ["frf", "hammer"], frfSource)) {
          const path = join(outDir, outputFileName(a.input, "out"));
          argv.push(path);
          inputs.push(path);
          needs.push(a.input);
        }
      } else {
        if (a.command === "paths") {
          const sources = a.inputs ?? [];
          if (sources.length === 0) {
            note(
              `${where}.inputs`,
              "paths needs the ids of the frf or hammer analyses holding each path's transfer, one per reference",
            );
          }
          const files: string[] = [];
          sources.forEach((source, k) => {
            if (!earlier(source, `${where}.inputs[${k}]`, ["frf", "hammer"], frfSource)) return;
            needs.push(source);
            files.push(join(outDir, outputFileName(source, "out")));
          });
          if (files.some((f) => f.includes(","))) {
            note(
              `${where}.inputs`,
              "an output folder whose path holds a comma cannot list transfers",
            );
          }
          if (files.length > 0 && files.length === sources.length) {
            argv.push("--transfer", files.join(","));
            inputs.push(...files);
          } else withheld.add("transfer");
        }
        if (a.recording === undefined) {
          fail(`${where}.recording`, `${a.command} needs a recording`);
        }
        const name = a.recording as string;
        if (draft.brokenRecordings.has(name)) return; // its entry's problems are named
        const rec = draft.recordings.get(name);
        if (rec === undefined) {
          fail(
            `${where}.recording`,
            `no recording "${name}" in recordings${didYouMean(name, recordingNames, nearest)}${
              recordingNames.length > 0 ? ` (recordings: ${recordingNames.join(", ")})` : ""
            }`,
          );
        }
        argv.push(at(rec!.file));
        inputs.push(at(rec!.file));
        if (rec!.setup !== undefined) {
          argv.push("--setup", at(rec!.setup));
          inputs.push(at(rec!.setup));
        }
        if (rec!.rate !== undefined) argv.push("--rate", String(rec!.rate));
        // The recording's slice; an analysis may narrow it with its own start/end, never widen it.
        checkSlice(options, rec!, name, where, fail);
        if (rec!.start !== undefined && !Object.hasOwn(options, "start")) {
          argv.push("--start", String(rec!.start));
        }
        if (rec!.end !== undefined && !Object.hasOwn(options, "end")) {
          argv.push("--end", String(rec!.end));
        }
      }
    });
    const outputs: Record<string, string> = {};
    const several = a.command === "frf" && severalNames(options.inputs);
    for (const key of outputKeys(a.command, several)) {
      outputs[key] = join(outDir, outputFileName(a.id, key));
    }
    argv.push(...optionsToArgv(options));
    for (const [key, path] of Object.entries(outputs)) argv.push(`--${key}`, path);
    check(where, a.command, argv, withheld);
    // A step whose id another step has writes nothing of its own: no second clash on its files.
    if (unique) {
      steps.push({
        id: a.id,
        kind: "analysis",
        command: a.command,
        argv,
        inputs,
        outputs,
        needs,
        where,
      });
    }
  });
  draft.comparisons.forEach((item, i) => {
    const where = `comparisons[${i}]`;
    if (!item.ok) {
      if (item.id !== undefined) claimId(item.id, "compare", where);
      return;
    }
    const c = item.value;
    const unique = claimId(c.id, "compare", where);
    const options = usableOptions(c.options, "compare", where);
    const test = join(outDir, outputFileName(c.test, "out"));
    const testKnown = known.get(c.test);
    if (testKnown === undefined) {
      note(
        `${where}.test`,
        `no analysis "${c.test}"${
          allIds.has(c.test)
            ? ": it comes later in the plan, and a comparison takes only earlier analyses"
            : didYouMean(c.test, [...known.keys()], nearest)
        }`,
      );
    } else if (testKnown.command === "compare") {
      note(
        `${where}.test`,
        `"${c.test}" is a comparison; comparison "${c.id}" must take the curve of an analysis`,
      );
    }
    const sim = at(c.simulation.file);
    each(() => inputFile(sim, c.simulation.file, `${where}.simulation.file`));
    const outputs: Record<string, string> = {};
    for (const key of outputKeys("compare", false)) {
      outputs[key] = join(outDir, outputFileName(c.id, key));
    }
    const argv = [test, sim, ...optionsToArgv(options)];
    if (c.test_column !== undefined) argv.push("--test-column", c.test_column);
    if (c.simulation.column !== undefined) argv.push("--sim-column", c.simulation.column);
    for (const [key, path] of Object.entries(outputs)) argv.push(`--${key}`, path);
    check(where, "compare", argv);
    if (unique) {
      steps.push({
        id: c.id,
        kind: "comparison",
        command: "compare",
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
        `no analysis "${ref}"${didYouMean(ref, [...known.keys()], nearest)}`,
      );
    }
  });
  each(() => {
    problems.push(...campaignPathProblems(draft, planFile, outDir, steps, also));
  });
  return { steps, problems };
}

/**
 * Options that would name a file the step writes (`out`, `format`, any
 * `*-out`), or a list entry holding a comma (which the command would read
 * as two entries while the runner counts one), are refused: named, and
 * their keys returned so that the command's own check leaves them out.
 */
function refuseOutputOptions(
  options: Readonly<Record<string, unknown>>,
  where: string,
  note: (where: string, detail: string) => void,
): Set<string> {
  const refused = new Set<string>();
  for (const [key, value] of Object.entries(options)) {
    if (key === "out" || key === "format" || key.endsWith("-out")) {
      note(
        `${where}.options.${key}`,
        "the plan runner names every file a step writes (from the step id): remove this option",
      );
      refused.add(key);
    }
    if (Array.isArray(value)) {
      const k = value.findIndex((entry) => String(entry).includes(","));
      if (k >= 0) {
        note(
          `${where}.options.${key}[${k}]`,
          `"${value[k]}" holds a comma: give each entry of the list on its own`,
        );
        refused.add(key);
      }
    }
  }
  return refused;
}

/** A bound of an analysis's own slice, as a number; undefined when absent or not a number. */
function bound(options: Readonly<Record<string, unknown>>, key: string): number | undefined {
  if (!Object.hasOwn(options, key)) return undefined;
  const value = Number(options[key]);
  return typeof options[key] === "boolean" || !Number.isFinite(value) ? undefined : value;
}

/** An analysis's start/end lie within its recording's slice (they may only narrow it). */
function checkSlice(
  options: Readonly<Record<string, unknown>>,
  rec: { start?: number; end?: number },
  name: string,
  where: string,
  fail: (where: string, detail: string) => never,
): void {
  const slice = `the slice of recording "${name}" (${rec.start ?? "its beginning"} to ${
    rec.end ?? "its end"
  } s)`;
  const rule = "an analysis may only narrow its recording's slice";
  const start = bound(options, "start");
  const end = bound(options, "end");
  for (const [key, value] of [["start", start], ["end", end]] as const) {
    if (value === undefined) continue;
    if (
      (rec.start !== undefined && value < rec.start) || (rec.end !== undefined && value > rec.end)
    ) {
      fail(`${where}.options.${key}`, `${key} ${value} s lies outside ${slice}: ${rule}`);
    }
  }
  if (start !== undefined && rec.end !== undefined && start >= rec.end) {
    fail(`${where}.options.start`, `start ${start} s leaves nothing of ${slice}: ${rule}`);
  }
  if (end !== undefined && rec.start !== undefined && end <= rec.start) {
    fail(`${where}.options.end`, `end ${end} s leaves nothing of ${slice}: ${rule}`);
  }
}

/**
 * The campaign's writes and inputs, checked by `checkCampaignPaths`: the
 * manifest (and any `also`), every step's outputs, the report and its
 * figures, against the plan, its recordings and every file it names. A
 * comparison's simulation that is another comparison's result is named as such.
 */
function campaignPathProblems(
  plan: PlanDraft,
  planFile: string,
  outDir: string,
  steps: readonly PlanStep[],
  also: readonly string[],
): [string, string][] {
  const writes: CampaignWrite[] = [
    { path: join(outDir, MANIFEST_FILE), who: "the manifest", where: "(output folder)" },
    ...also.map((path) => ({ path, who: "the run", where: "(output folder)" })),
  ];
  for (const step of steps) {
    for (const [key, path] of Object.entries(step.outputs)) {
      const why = sideOutputNote(step.id, key);
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
  const inputs = planInputs(plan, planFile).filter((input) => !clash.has(input.what));
  return [...problems, ...checkCampaignPaths(outDir, writes, inputs)];
}

// Hashes by path, size and modification time: a recording used by several
// steps of a run is hashed once.
const hashCache = new Map<string, string>();

/**
 * A file's record for a manifest: path relative to the output folder (when
 * inside it), size and SHA-256.
 */
export async function record(path: string, outDir: string): Promise<FileRecord> {
  const stat = statSync(path);
  // A FIFO or device would never end its hash; planSteps refuses them, this is the last guard.
  if (!stat.isFile()) throw new Error(`${path} is ${fileKind(stat)}, not a regular file`);
  const key = `${path}\u0000${stat.size}\u0000${stat.mtimeMs}`;
  let sha256 = hashCache.get(key);
  if (sha256 === undefined) {
    sha256 = await hashFile(path);
    hashCache.set(key, sha256);
  }
  return { path: relative(outDir, path) || path, bytes: stat.size, sha256 };
}

/** SHA-256 of a file's bytes, read in blocks (no cache: the clean-up's proof reads the file now). */
async function hashFile(path: string): Promise<string> {
  const hash = createHash("sha256");
  const handle = await open(path, "r");
  try {
    const buffer = new Uint8Array(1 << 22);
    for (;;) {
      const { bytesRead } = await handle.read(buffer, 0, buffer.length, null);
      if (bytesRead === 0) break;
      hash.update(buffer.subarray(0, bytesRead));
    }
  } finally {
    await handle.close();
  }
  return hash.digest("hex");
}

/** Options of {@linkcode runPlan}. */
export interface RunOptions {
  /** Output folder. Required. */
  outDir: string;
  /** The commands by name. Required. */
  commands: Readonly<Record<string, PlanCommand>>;
  /** Progress reporter. Default: stderr. */
  progress?: Progress;
  /** Writes the report; called when the plan has a `report` section. */
  report?: (outDir: string, manifest: Manifest, plan: Plan) => Promise<string>;
  /** Suggests the nearest name for a slip in the plan (cli/args.ts `nearestName`). Default: none. */
  nearest?: Nearest;
  /** Steps run at once, each as soon as the steps it needs are done. Default 1. */
  jobs?: number;
  /** Unmet targets make the run exit with its own code, whatever the plan says. Default false. */
  requireTargets?: boolean;
  /** Runs one step; default: the command's `run` in this process (a pool passes its own). */
  execute?: (command: string, argv: readonly string[], stepId: string) => Promise<void>;
  /**
   * Run only this shard's steps (shards.ts), writing a partial manifest
   * `manifest.shard-K-of-N.json` and no targets or report (the merge does).
   * Default: the whole plan.
   */
  shard?: Shard;
}

/**
 * Runs a plan file and returns its manifest (also written as
 * `<outDir>/manifest.json`).
 *
 * @throws {QuiverError} (usage) for a plan that fails validation; step
 * failures are recorded in the manifest instead.
 *
 * @example
 * ```ts
 * import { runPlan } from "./runner.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/run.csv`, "time_s,mic [Pa]\n0,0\n0.5,1\n1,0\n");
 * await writeFile(`${dir}/plan.json`, JSON.stringify({ quiver_plan: 1, title: "doc",
 *   recordings: { r: { file: "run.csv" } }, analyses: [{ id: "s", command: "spectrum", recording: "r", options: {} }],
 *   report: { title: "doc" } }));
 * // A stand-in command writing a two-line spectrum; quiver's own commands come from cli/commands.ts.
 * const spectrum = { validate() {}, async run(argv: readonly string[]) {
 *   await writeFile(argv[argv.indexOf("--out") + 1], JSON.stringify({
 *     metadata: { analysis: "spectrum", kind: "rms", df_hz: 1, averages: 1, window: "hann" },
 *     columns: [{ name: "frequency_hz", unit: "", values: [0, 1] }, { name: "mic", unit: "Pa", values: [0, 0.5] }] }));
 * } };
 * const manifest = await runPlan(`${dir}/plan.json`, { outDir: `${dir}/out`, commands: { spectrum }, progress: { start() {}, end() {} } });
 * if (manifest.status !== "ok" || manifest.steps[0].outputs.out.sha256.length !== 64) throw new Error();
 * ```
 */
export async function runPlan(planFile: string, options: RunOptions): Promise<Manifest> {
  const started = new Date().toISOString();
  const outDir = resolve(options.outDir);
  const shard = options.shard;
  const manifestFile = shard !== undefined ? shardManifestName(shard) : MANIFEST_FILE;
  const { plan, text, steps: all } = await checkPlan(planFile, outDir, options.commands, {
    also: shard !== undefined ? [join(outDir, manifestFile)] : [],
    ...(options.nearest !== undefined ? { nearest: options.nearest } : {}),
  });
  // A shard runs its own steps only; the whole plan was validated above all the same.
  const shardOf = shard !== undefined ? assignShards(all, shard.count) : undefined;
  const steps = shardOf === undefined ? all : all.filter((_, i) => shardOf[i] === shard!.index);
  await mkdir(outDir, { recursive: true });
  // One lock per folder: the shards of this plan share it; anything else waits or is refused.
  const lock = await acquireFolderLock(
    outDir,
    shard !== undefined
      ? { kind: "shards", planSha256: sha256Hex(text), index: shard.index, count: shard.count }
      : { kind: "run" },
  );
  try {
    if (lock.stale !== undefined) {
      process.stderr.write(
        `run: the lock of a run that was killed (process ${lock.stale.pid}, started ${lock.stale.started}) was found and taken over\n`,
      );
    }
    const inputs = new Set(
      planInputs(draftOfPlan(plan), resolve(planFile)).map((i) => realPathOf(i.path)),
    );
    // What this run writes: a file there that is not provably the previous run's (a result
    // edited since, a file of the user's) is refused before anything is removed or written.
    const writes = steps.flatMap((s) => Object.values(s.outputs));
    if (plan.report !== undefined && shard === undefined) {
      writes.push(join(outDir, plan.report.file));
    }
    const { removed, left } = await removePreviousRun(outDir, manifestFile, inputs, writes);
    if (removed > 0) {
      process.stderr.write(`run: removed ${removed} result file(s) of the previous run here\n`);
    }
    if (left.length > 0) {
      process.stderr.write(
        `run: left ${left.length} file(s) the previous manifest lists, not provably its results: ${
          left.slice(0, 5).join("; ")
        }${left.length > 5 ? "; …" : ""}\n`,
      );
    }
    return await runLocked({
      plan,
      text,
      planFile,
      outDir,
      steps,
      started,
      options,
      manifestFile,
      release: () => lock.release(),
    });
  } finally {
    await lock.release();
  }
}

/** Every file the plan reads: the plan, recordings, set-ups, simulations, geometry, maps. */
function planInputs(plan: PlanDraft, planFile: string): CampaignInput[] {
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
    const a = item.value;
    if (a.simulation !== undefined) {
      inputs.push({ path: at(a.simulation.file), what: `analyses[${i}].simulation.file` });
    }
    if (a.geometry !== undefined) {
      inputs.push({ path: at(a.geometry.file), what: `analyses[${i}].geometry.file` });
    }
    if (a.map !== undefined) inputs.push({ path: at(a.map.file), what: `analyses[${i}].map.file` });
  });
  return inputs;
}

/**
 * Removes what the previous run's manifest lists and this project can prove
 * it wrote, then the manifest itself, so that the folder never holds results
 * of two runs side by side. A listed file is removed only when its name is
 * one the runner gives (`<id>.json`, `<id>_<part>.json`, the report's
 * `<name>.html`, `figures/<name>.svg`), it lies inside the folder (no link
 * on the way, the file itself no link), it is none of this plan's inputs
 * (`inputs`: real paths), and its size and SHA-256 are still those the
 * manifest recorded. Everything else is left, and named in `left`.
 */
async function removePreviousRun(
  outDir: string,
  manifestFile: string,
  inputs: ReadonlySet<string>,
  writes: readonly string[],
): Promise<{ removed: number; left: string[] }> {
  const manifestPath = join(outDir, manifestFile);
  let previous: unknown = undefined;
  try {
    previous = JSON.parse(await readFile(manifestPath, "utf8"));
  } catch {
    // none, or not JSON: nothing of it is trusted
  }
  const parsed = previous === undefined ? undefined : manifestSchema.safeParse(previous);
  const candidates: FileRecord[] = [];
  const left: string[] = [];
  if (parsed !== undefined && !parsed.success) {
    left.push(`${manifestFile} (not a quiver manifest: nothing it names)`);
  }
  for (const step of parsed?.success === true ? parsed.data.steps : []) {
    for (const [key, file] of Object.entries(step.outputs)) {
      let expected: string | undefined;
      try {
        expected = /^[A-Za-z0-9_-]+$/.test(step.id) ? outputFileName(step.id, key) : undefined;
      } catch {
        expected = undefined; // not an output key
      }
      if (file.path === expected) candidates.push(file);
      else left.push(`${file.path} (not a name quiver gives step "${step.id}")`);
    }
  }
  for (const file of (parsed?.success === true ? parsed.data.report_files : undefined) ?? []) {
    if (isReportFileName(file.path) || isFigureName(file.path)) candidates.push(file);
    else left.push(`${file.path} (not a name quiver gives the report)`);
  }
  const realOut = realPathOf(outDir);
  const proven: string[] = [];
  for (const file of candidates) {
    const path = join(outDir, file.path);
    const why = await notProvablyOurs(path, realOut, file, inputs);
    if (why === undefined) proven.push(resolve(path));
    else if (why !== "gone") left.push(`${file.path} (${why})`);
  }
  // Checked before anything is removed: this run would replace a file it cannot prove the
  // previous run's (edited since, or never a quiver result), and that is the user's data.
  const removable = new Set(proven);
  const kept = writes.filter((w) => existsSync(w) && !removable.has(resolve(w)));
  if (kept.length > 0) {
    throw new QuiverError(
      `this run would replace ${kept.length} file(s) that are not provably results of the previous run here (edited since, or not written by quiver): ${
        kept.slice(0, 5).map((w) => relative(outDir, w)).join(", ")
      }${kept.length > 5 ? ", …" : ""}; move them away or remove them, then run again`,
      { file: outDir },
      "usage",
    );
  }
  let removed = 0;
  for (const path of proven) {
    await rm(path);
    removed++;
  }
  if (parsed === undefined || !parsed.success) return { removed, left };
  // The figures folder goes only when nothing is left in it (rmdir refuses otherwise).
  await rmdir(join(outDir, FIGURES_FOLDER)).catch(() => {});
  await rm(manifestPath, { force: true });
  return { removed, left };
}

/** Why the file at `path` cannot be proven the one `file` records; undefined when it can. */
async function notProvablyOurs(
  path: string,
  realOut: string,
  file: FileRecord,
  inputs: ReadonlySet<string>,
): Promise<string | undefined> {
  let stat;
  try {
    stat = lstatSync(path);
  } catch {
    return "gone";
  }
  if (!stat.isFile()) return "not a plain file";
  const real = realPathOf(path);
  if (!real.startsWith(realOut + sep)) return "outside the folder";
  if (inputs.has(real)) return "an input of this plan";
  if (stat.size !== file.bytes) return "changed since";
  return (await hashFile(path)) === file.sha256 ? undefined : "changed since";
}

/**
 * Writes the report with `write` and lists what it wrote: the report file
 * and every figure under `figures/` that it created or replaced, each with
 * its size and SHA-256, so that the next run removes exactly these. Files
 * already there and left unchanged are not listed. The returned path is
 * checked to lie directly in the folder.
 *
 * @example
 * ```ts
 * import { writeRecordedReport } from "./runner.ts";
 * import { mkdir, mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await mkdir(`${dir}/figures`);
 * await writeFile(`${dir}/figures/notes.txt`, "mine");
 * const { report, files } = await writeRecordedReport(dir, async () => {
 *   await writeFile(`${dir}/figures/a.svg`, "<svg/>");
 *   await writeFile(`${dir}/r.html`, "<html></html>");
 *   return `${dir}/r.html`;
 * });
 * if (report !== "r.html" || files.map((f) => f.path).sort().join() !== "figures/a.svg,r.html") throw new Error();
 * ```
 */
export async function writeRecordedReport(
  outDir: string,
  write: () => Promise<string>,
): Promise<{ report: string; files: FileRecord[] }> {
  const figures = join(outDir, FIGURES_FOLDER);
  const before = new Map<string, string>();
  for (const name of await listFiles(figures)) before.set(name, fileStamp(join(figures, name)));
  const reportPath = await write();
  const report = relative(outDir, reportPath);
  if (!isReportFileName(report)) {
    throw new Error(`the report was written to ${reportPath}, not a file name in ${outDir}`);
  }
  const files = [await record(reportPath, outDir)];
  for (const name of await listFiles(figures)) {
    const path = join(figures, name);
    if (isFigureName(`${FIGURES_FOLDER}/${name}`) && before.get(name) !== fileStamp(path)) {
      files.push({ ...(await record(path, outDir)), path: `${FIGURES_FOLDER}/${name}` });
    }
  }
  return { report, files };
}

/** Plain files directly in `folder` (none when it does not exist). */
async function listFiles(folder: string): Promise<string[]> {
  try {
    const entries = await readdir(folder, { withFileTypes: true });
    return entries.filter((e) => e.isFile()).map((e) => e.name);
  } catch {
    return [];
  }
}

/** Identity of a file's present content for "did this change": inode, size, mtime; "" when absent. */
function fileStamp(path: string): string {
  try {
    const s = lstatSync(path);
    return `${s.dev}:${s.ino}:${s.size}:${s.mtimeMs}`;
  } catch {
    return "";
  }
}

/**
 * The signals a run catches to leave its manifest `aborted` rather than
 * `running` (SIGKILL cannot be caught: the next run finds its lock).
 */
const CAUGHT_SIGNALS = ["SIGINT", "SIGTERM", "SIGHUP"] as const;

async function runLocked(
  { plan, text, planFile, outDir, steps, started, options, manifestFile, release }: {
    plan: Plan;
    text: string;
    planFile: string;
    outDir: string;
    steps: readonly PlanStep[];
    started: string;
    options: RunOptions;
    manifestFile: string;
    /** Lets the folder's lock go (a signal ends the process before any finally runs). */
    release: () => Promise<void>;
  },
): Promise<Manifest> {
  const planBytes = new TextEncoder().encode(text);
  const header = {
    quiver_version: QUIVER_VERSION,
    plan: {
      path: resolve(planFile),
      bytes: planBytes.length,
      sha256: sha256Hex(planBytes),
      title: plan.title,
    },
    out_dir: outDir,
    started,
    require_targets: plan.require_targets || options.requireTargets === true,
    ...(options.shard !== undefined ? { shard: options.shard } : {}),
  };
  // The manifest says "running" from the start and lists each step as it ends, so a
  // killed run leaves a manifest that says it did not finish and what it did.
  let writing = Promise.resolve();
  const writeManifest = (manifest: Manifest) => {
    writing = writing.catch(() => {}).then(() =>
      writeFileAtomic(join(outDir, manifestFile), JSON.stringify(manifest, null, 2) + "\n")
    );
    return writing;
  };
  const results: Manifest["steps"][number][] = new Array(steps.length);
  const listed = () => results.filter((r) => r !== undefined);
  const progressManifest = (): Manifest => ({
    ...header,
    finished: null,
    status: "running",
    steps: listed(),
    targets: [],
  });
  // Whatever ends the run early (an error of ours, a full disk, a signal), the manifest
  // then says "aborted" and why, never "running".
  let ended = false;
  const abort = async (reason: string) => {
    if (ended) return;
    ended = true;
    await writeManifest({
      ...header,
      finished: new Date().toISOString(),
      status: "aborted",
      error: reason,
      steps: listed(),
      targets: [],
    }).catch(async () => {
      // Not even that could be written (a full disk): no manifest rather than one saying "running".
      await rm(join(outDir, manifestFile), { force: true }).catch(() => {});
    });
  };
  const onSignal = (signal: string, code: number) => () => {
    process.stderr.write(`run: stopped by ${signal}; the manifest says aborted\n`);
    void abort(`stopped by ${signal}`).then(release).finally(() => process.exit(code));
  };
  const handlers = CAUGHT_SIGNALS.map((signal, k) => {
    const handler = onSignal(signal, [130, 143, 129][k]);
    try {
      process.on(signal, handler);
    } catch {
      return () => {}; // a signal this system does not have (SIGHUP on Windows)
    }
    return () => process.off(signal, handler);
  });
  try {
    await writeManifest(progressManifest());
    const manifest = await runSteps();
    ended = true;
    return manifest;
  } catch (error) {
    await abort(error instanceof Error ? error.message : String(error));
    throw error;
  } finally {
    for (const off of handlers) off();
  }

  async function runSteps(): Promise<Manifest> {
    const progress = options.progress ?? createProgress(steps.length);
    const failed = new Set<string>();
    const done = new Set<string>();
    const execute = options.execute ??
      ((command: string, argv: readonly string[]) => options.commands[command].run(argv));
    const runStep = async (i: number): Promise<void> => {
      const step = steps[i];
      const label = `${step.command} ${step.id}`;
      const begin = performance.now();
      progress.start(i + 1, label);
      const blocked = step.needs.find((n) => failed.has(n));
      const inputs = await Promise.all(
        step.inputs.filter((p) => existsSync(p)).map((p) => record(p, outDir)),
      );
      const base = { id: step.id, kind: step.kind, command: step.command, argv: step.argv, inputs };
      if (blocked !== undefined) {
        failed.add(step.id);
        progress.end(i + 1, label, false, 0, `skipped: "${blocked}" failed`);
        results[i] = {
          ...base,
          outputs: {},
          status: "skipped",
          error: `needs "${blocked}", which failed`,
          seconds: 0,
        };
        return;
      }
      // What lies at each output path now: after a failure, a file that changed was the step's.
      const stamps = Object.values(step.outputs).map((path) => [path, fileStamp(path)] as const);
      try {
        await execute(step.command, step.argv, step.id);
        const outputs: Record<string, FileRecord> = {};
        for (const [key, path] of Object.entries(step.outputs)) {
          if (existsSync(path) && statSync(path).isFile()) {
            outputs[key] = await record(path, outDir);
          }
        }
        const seconds = (performance.now() - begin) / 1000;
        progress.end(i + 1, label, true, seconds);
        results[i] = { ...base, outputs, status: "ok", seconds };
      } catch (error) {
        failed.add(step.id);
        let message = error instanceof Error ? error.message : String(error);
        // A step that fails half-way (a full disk) leaves none of its outputs behind.
        const partial: string[] = [];
        for (const [path, stamp] of stamps) {
          const now = fileStamp(path);
          if (now !== "" && now !== stamp) {
            await rm(path, { force: true });
            partial.push(relative(outDir, path));
          }
        }
        if (partial.length > 0) message += ` (its partial outputs removed: ${partial.join(", ")})`;
        const seconds = (performance.now() - begin) / 1000;
        progress.end(i + 1, label, false, seconds, message);
        results[i] = { ...base, outputs: {}, status: "failed", error: message, seconds };
      }
    };
    // Steps start in plan order as soon as what they need is done, up to `jobs` at once.
    const jobs = Math.max(1, options.jobs ?? 1);
    const running = new Map<number, Promise<number>>();
    const waiting = steps.map((_, i) => i);
    while (waiting.length > 0 || running.size > 0) {
      for (let w = 0; w < waiting.length && running.size < jobs;) {
        const i = waiting[w];
        if (steps[i].needs.every((n) => done.has(n))) {
          waiting.splice(w, 1);
          running.set(i, runStep(i).then(() => i));
        } else {
          w++;
        }
      }
      if (running.size === 0) break; // cannot happen: needs always name earlier steps
      const finished = await Promise.race(running.values());
      running.delete(finished);
      done.add(steps[finished].id);
      await writeManifest(progressManifest());
    }
    // A shard's targets wait for the merge: they may read any shard's results.
    const targets = options.shard === undefined ? await evaluateTargets(plan, outDir, failed) : [];
    let manifest: Manifest = {
      ...header,
      finished: new Date().toISOString(),
      status: results.some((r) => r.status !== "ok") ? "failed" : "ok",
      steps: results,
      targets,
    };
    const report = options.report;
    if (plan.report !== undefined && report !== undefined && options.shard === undefined) {
      const written = await writeRecordedReport(outDir, () => report(outDir, manifest, plan));
      manifest = { ...manifest, report: written.report, report_files: written.files };
    }
    await writeManifest(manifest);
    return manifest;
  }
}

/** Whether an `inputs` option names two or more channels (a list, or "a,b" text). */
function severalNames(value: unknown): boolean {
  if (Array.isArray(value)) return value.length > 1;
  return typeof value === "string" && value.split(",").length > 1;
}
