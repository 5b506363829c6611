/**
 * Running a plan: validate everything first, then run each analysis and
 * comparison in order with its command, check the targets, write the
 * manifest and (when the plan asks) the report.
 *
 * Validation before any work (plan_file.ts): the plan's schema (errors name
 * the key path), references between steps, the existence of every input
 * file, and each step's options against its command's own option schema.
 *
 * Fault isolation (run_steps.ts): a step that fails is recorded in the
 * manifest with its error; steps that need its output are skipped with the
 * reason; the others still run. The manifest's `status` and the caller's
 * exit code say so.
 *
 * @module
 */
import type { Manifest } from "./manifest.ts";
export type { FileRecord, Manifest } from "./manifest.ts";
import { acquireFolderLock } from "./folder_lock.ts";
import { assignShards, type Shard, shardManifestName } from "./shards.ts";
import { MANIFEST_FILE } from "./campaign_paths.ts";
export { MANIFEST_FILE } from "./campaign_paths.ts";
import { realPathOf } from "../io/output_paths.ts";
import { mkdir } from "node:fs/promises";
import process from "node:process";
import { join, resolve } from "node:path";
import { sha256Hex } from "../io/table_file.ts";
import type { AnalysisTable } from "../analyses.ts";
import { draftOfPlan, type Plan } from "./schema.ts";
import type { Progress } from "./progress.ts";
import { checkPlan } from "./plan_file.ts";
export { checkPlan, loadPlan, planSteps } from "./plan_file.ts";
import type { PlanCommand } from "./step_options.ts";
export type { PlanCommand, PlanOptionProblem } from "./step_options.ts";
export type { PlanStep } from "./plan_steps.ts";
import { planInputs } from "./campaign_files.ts";
import { removePreviousRun } from "./previous_run.ts";
import { runLocked } from "./run_steps.ts";
export { writeRecordedReport } from "./report_files.ts";
export { record } from "./file_record.ts";

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
  /** The analyses the plan's steps and targets may name. Default: quiver's (lib/analyses.ts). */
  table?: AnalysisTable;
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
    ...(options.table !== undefined ? { table: options.table } : {}),
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
      planInputs(draftOfPlan(plan), resolve(planFile), options.table).map((i) =>
        realPathOf(i.path)
      ),
    );
    // What this run writes: a file there that is not provably the previous run's (a result
    // edited since, a file of the user's) is refused before anything is removed or written.
    const writes = steps.flatMap((s) => Object.values(s.outputs));
    if (plan.report !== undefined && shard === undefined) {
      writes.push(join(outDir, plan.report.file));
    }
    const { removed, left } = await removePreviousRun(
      outDir,
      manifestFile,
      inputs,
      writes,
      options.table,
    );
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
