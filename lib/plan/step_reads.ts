/**
 * What a plan step reads, turned into its command's arguments as its
 * analysis's descriptor says (lib/analysis_descriptor.ts `StepReads`):
 * earlier steps' results, plan files, then its recording with the
 * recording's set-up, rate and slice. Each problem is noted at its key path
 * and the step's other reads still checked.
 *
 * @module
 */
import { join } from "node:path";
import type { FileRead, ResultsRead, StepReads } from "../analysis_descriptor.ts";
import type { AnalysisTable } from "../analyses.ts";
import { didYouMeanClause } from "../nearest_name.ts";
import { outputFileName, outputWrites } from "./campaign_paths.ts";
import { type OptionValue, type PlanAnalysis, type PlanDraft, stepFile } from "./schema.ts";
import type { Note } from "./step_options.ts";

/** What checking one step needs of the plan around it. */
export interface StepContext {
  readonly draft: PlanDraft;
  readonly outDir: string;
  readonly table: AnalysisTable;
  /** A plan path resolved against the plan's folder. */
  at(path: string): string;
  readonly note: Note;
  /** Whether `path` is a regular file; notes why not at `where`. */
  inputFile(path: string, shown: string, where: string): boolean;
  /**
   * Whether `ref` names an earlier step whose command is one of `accept`;
   * notes why not, except for a step whose own entry is broken (named already).
   */
  earlier(ref: string, where: string, accept: readonly string[]): boolean;
  /** The command of the earlier step `ref`, if known. */
  commandOf(ref: string): string | undefined;
}

/** A step's arguments as they are gathered, and the options withheld after a failed reference. */
export interface StepArguments {
  readonly argv: string[];
  readonly inputs: string[];
  readonly needs: string[];
  /** Options the runner would give from references that failed (named there, not again). */
  readonly withheld: Set<string>;
}

/** Gives a step everything it reads, in its command's order. */
export function readStep(
  context: StepContext,
  a: PlanAnalysis,
  where: string,
  reads: StepReads,
  options: Readonly<Record<string, OptionValue>>,
  args: StepArguments,
): void {
  if (reads.results !== undefined) readResults(context, a, where, reads.results, args);
  for (const file of reads.files ?? []) readFile(context, a, where, file, args);
  if (reads.recording) readRecording(context, a, where, options, args);
}

/** The ids a step names under `read.key`, each with its key path. */
function sources(a: PlanAnalysis, where: string, read: ResultsRead): [string, string][] {
  if (read.key === "input") return a.input !== undefined ? [[a.input, `${where}.input`]] : [];
  if (a.inputs !== undefined) return a.inputs.map((id, k) => [id, `${where}.inputs[${k}]`]);
  return read.inputOrInputs === true && a.input !== undefined ? [[a.input, `${where}.input`]] : [];
}

/** Earlier steps' results: positional arguments, or one option listing them all. */
function readResults(
  context: StepContext,
  a: PlanAnalysis,
  where: string,
  read: ResultsRead,
  { argv, inputs, needs, withheld }: StepArguments,
): void {
  const { note, outDir } = context;
  const named = sources(a, where, read);
  if (named.length === 0) note(`${where}.${read.key}`, read.missing);
  const files: string[] = [];
  for (const [source, at] of named) {
    if (!context.earlier(source, at, read.from)) continue;
    const writes = outputWrites(context.table.get(context.commandOf(source) ?? ""), read.output);
    const path = join(outDir, outputFileName(source, read.output, writes));
    needs.push(source);
    if (read.option === undefined) {
      argv.push(path);
      inputs.push(path);
    } else files.push(path);
  }
  if (read.option === undefined) return;
  // One option lists them, separated by commas: a path with a comma would read as two.
  if (files.some((f) => f.includes(","))) {
    note(
      `${where}.${read.key}`,
      `an output folder whose path holds a comma cannot list ${read.option}s`,
    );
  }
  if (files.length > 0 && files.length === named.length) {
    argv.push(`--${read.option}`, files.join(","));
    inputs.push(...files);
  } else withheld.add(read.option);
}

/** A plan file (`{ "file": … }` under its key): a positional argument or an option. */
function readFile(
  context: StepContext,
  a: PlanAnalysis,
  where: string,
  read: FileRead,
  { argv, inputs }: StepArguments,
): void {
  const name = stepFile(a, read.key);
  if (name === undefined) {
    if (read.missing !== undefined) context.note(`${where}.${read.key}.file`, read.missing);
    return;
  }
  const file = context.at(name);
  context.inputFile(file, name, `${where}.${read.key}.file`);
  argv.push(...(read.option !== undefined ? [`--${read.option}`, file] : [file]));
  inputs.push(file);
}

/** The step's recording, its set-up and rate, and its slice (which the step may only narrow). */
function readRecording(
  context: StepContext,
  a: PlanAnalysis,
  where: string,
  options: Readonly<Record<string, OptionValue>>,
  { argv, inputs }: StepArguments,
): void {
  const { draft, note, at } = context;
  if (a.recording === undefined) {
    note(`${where}.recording`, `${a.command} needs a recording`);
    return;
  }
  const name = a.recording;
  if (draft.brokenRecordings.has(name)) return; // its entry's problems are named
  const rec = draft.recordings.get(name);
  if (rec === undefined) {
    const recordingNames = [...draft.recordings.keys(), ...draft.brokenRecordings];
    note(
      `${where}.recording`,
      `no recording "${name}" in recordings${didYouMeanClause(name, recordingNames)}${
        recordingNames.length > 0 ? ` (recordings: ${recordingNames.join(", ")})` : ""
      }`,
    );
    return;
  }
  argv.push(at(rec.file));
  inputs.push(at(rec.file));
  if (rec.setup !== undefined) {
    argv.push("--setup", at(rec.setup));
    inputs.push(at(rec.setup));
  }
  if (rec.rate !== undefined) argv.push("--rate", String(rec.rate));
  if (rec.group !== undefined) argv.push("--group", rec.group);
  // The recording's slice; an analysis may narrow it with its own start/end, never widen it.
  const problem = sliceProblem(options, rec, name, where);
  if (problem !== undefined) {
    note(...problem);
    return;
  }
  if (rec.start !== undefined && !Object.hasOwn(options, "start")) {
    argv.push("--start", String(rec.start));
  }
  if (rec.end !== undefined && !Object.hasOwn(options, "end")) {
    argv.push("--end", String(rec.end));
  }
}

/** A bound of an analysis's own slice, as a number; undefined when absent or not a number. */
function bound(options: Readonly<Record<string, unknown>>, key: string): number | undefined {
  if (!Object.hasOwn(options, key)) return undefined;
  const value = Number(options[key]);
  return typeof options[key] === "boolean" || !Number.isFinite(value) ? undefined : value;
}

/**
 * The first way an analysis's start/end leave its recording's slice (they
 * may only narrow it), as `[where, detail]`; undefined when they lie within.
 *
 * @example
 * ```ts
 * import { sliceProblem } from "./step_reads.ts";
 * if (sliceProblem({ start: 2 }, { start: 1, end: 5 }, "road", "analyses[0]") !== undefined) throw new Error();
 * const [where] = sliceProblem({ end: 9 }, { end: 5 }, "road", "analyses[0]")!;
 * if (where !== "analyses[0].options.end") throw new Error();
 * ```
 */
export function sliceProblem(
  options: Readonly<Record<string, unknown>>,
  rec: { start?: number; end?: number },
  name: string,
  where: string,
): [string, string] | undefined {
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
      return [`${where}.options.${key}`, `${key} ${value} s lies outside ${slice}: ${rule}`];
    }
  }
  if (start !== undefined && rec.end !== undefined && start >= rec.end) {
    return [`${where}.options.start`, `start ${start} s leaves nothing of ${slice}: ${rule}`];
  }
  if (end !== undefined && rec.start !== undefined && end <= rec.start) {
    return [`${where}.options.end`, `end ${end} s leaves nothing of ${slice}: ${rule}`];
  }
  return undefined;
}
