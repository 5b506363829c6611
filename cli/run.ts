/**
 * `quiver run`: a whole campaign from one plan file.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { basename, dirname, join } from "node:path";
import process from "node:process";
import { z } from "npm:zod@4.6.7";
import { writeReport } from "../lib/report/html_report.ts";
import { loadPlan, type Manifest, runPlan } from "../lib/plan/runner.ts";
import { parseShard } from "../lib/plan/shards.ts";
import { slurmScript } from "../lib/plan/slurm.ts";
import { fileURLToPath } from "node:url";
import { resolve } from "node:path";
import { integerOption, parseCommandArgs, usageError } from "./args.ts";
import { option, shapeOf, specOf } from "./option_table.ts";
import { TARGETS_NOT_MET_EXIT } from "./exit_codes.ts";
import { withStderrLabel } from "./terminal.ts";
import { capJobs, WorkerPool } from "./worker_pool.ts";
import { totalmem } from "node:os";
import { assertFolderOrAbsent } from "../lib/io/file_kinds.ts";
import { planCommandTable } from "./plan_commands.ts";

/** One-line summary for the command list. */
export const summary =
  "runs a campaign plan: every analysis, comparison and target, the manifest and the report";

/** The command's help text. */
export const help = `quiver run PLAN.json [--out-dir DIR] [--jobs N] [--shard K/N|auto]
quiver run PLAN.json --history DB --build LABEL [--out-dir DIR] [--jobs N]
quiver run PLAN.json --slurm-script N [--partition P] [--time T] [--cpus C] [--out-dir DIR]

Runs every analysis and comparison of a plan file in order, checks its
targets, and writes under DIR (default: out/<plan name>/ beside the plan):
one JSON result per step, manifest.json (inputs with sizes and sha256,
options, quiver version, status per step) and, when the plan has a report
section, the HTML report with its figures/ folder.

Everything is validated before any work starts: the plan's keys (errors name
the key path), references between steps, input files, and every step's
options against its command. A step that fails is recorded in the manifest;
the others still run, and the exit code is 1.

--require-targets makes a run whose targets are not all met (a FAIL, or a
target that could not be checked) exit with code 4, for scripts and CI; the
plan key "require_targets": true does the same. Without either, targets are
reported and the exit code is 0. A failed step exits 1 first.

--jobs N runs up to N independent steps at once, each in its own worker
(default: the number of CPU cores); workers start only when a step needs one,
after the plan has been checked, so no more start than steps can run at once.
N is capped at the CPU cores and at the workers half the machine's memory
holds at 512 MiB each (an estimate per worker); the run says when it caps.
--jobs 1 runs the steps one after another in this process. Every line a step
writes starts with its id.

--shard K/N runs only shard K of N (1-based) into DIR: steps that need each
other stay together, groups are dealt by the size of their recordings. Each
shard writes manifest.shard-K-of-N.json and its own results, and leaves
targets and the report to \`quiver merge DIR\`. The shards of one campaign
(the same plan, split the same N ways) share the folder's one lock, each with
a lock of its own beside it; a whole run, or shards of another plan or N, are
refused until the merge. --shard auto
takes K and N from a Slurm job array (SLURM_ARRAY_TASK_ID, _MIN, _COUNT).

--slurm-script N prints a bash script that submits the N shards as a Slurm
job array and the merge as a job that waits for them (an sbatch dependency);
run it on the cluster's login node: bash campaign_slurm.sh. DIR must be on a
file system every node sees. --partition, --time (Slurm's format, e.g.
02:00:00) and --cpus (per shard, also its --jobs) go into both submissions.

--history DB --build LABEL adds the finished run to a history of runs
(a SQLite file or postgres://…), as quiver history add does.

The plan file (every key, with an example) is described in README.md,
"The plan file".
`;

const TABLE = {
  "out-dir": option(z.string().min(1), { value: "DIR", help: "where the results go" }),
  jobs: option(integerOption(), { value: "N", help: "steps at once" }),
  "require-targets": option(z.boolean(), { flag: true, help: "exit 4 when a target is not met" }),
  shard: option(z.string().min(1), { value: "K/N", help: "run shard K of N only (or auto)" }),
  "slurm-script": option(integerOption(), {
    value: "N",
    help: "print a script submitting N shards and the merge",
  }),
  partition: option(z.string().min(1), { value: "P", help: "Slurm partition" }),
  time: option(z.string().min(1), { value: "T", help: "Slurm time limit per job" }),
  cpus: option(integerOption(), { value: "C", help: "CPUs per shard" }),
  history: option(z.string().min(1), {
    value: "DB",
    help: "add the finished run to this history (quiver history)",
  }),
  build: option(z.string().min(1), { value: "LABEL", help: "the run's build, with --history" }),
};

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE)).refine(
  (v) =>
    v["slurm-script"] !== undefined ||
    (v.partition === undefined && v.time === undefined && v.cpus === undefined),
  { message: "--partition, --time and --cpus go with --slurm-script" },
).refine((v) => v["slurm-script"] === undefined || v.shard === undefined, {
  message: "give --shard or --slurm-script, not both",
}).refine((v) => (v.history === undefined) === (v.build === undefined), {
  message: "--history and --build go together",
}).refine(
  (v) => v.history === undefined || (v.shard === undefined && v["slurm-script"] === undefined),
  { message: "--history records a whole run: add the merged run with quiver history add" },
);

/** Runs the command; sets the exit code to 1 when a step failed. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`run takes one plan file, got ${positionals.length}`);
  const [planFile] = positionals;
  const outDir = values["out-dir"] ??
    join(dirname(planFile), "out", basename(planFile).replace(/\.json$/i, ""));
  if (values["slurm-script"] !== undefined) {
    // The script is run later, on another machine: a plan that cannot be read or is not valid
    // is refused now rather than found by every shard.
    await loadPlan(planFile);
    process.stdout.write(slurmScript({
      shards: values["slurm-script"],
      plan: resolve(planFile),
      outDir: resolve(outDir),
      deno: process.execPath,
      main: fileURLToPath(new URL("./main.ts", import.meta.url)),
      ...(values.partition !== undefined ? { partition: values.partition } : {}),
      ...(values.time !== undefined ? { time: values.time } : {}),
      ...(values.cpus !== undefined ? { cpus: values.cpus } : {}),
    }));
    return;
  }
  const shard = values.shard !== undefined ? parseShard(values.shard, process.env) : undefined;
  assertFolderOrAbsent(outDir, values["out-dir"] !== undefined ? "--out-dir" : "the output folder");
  const cores = navigator.hardwareConcurrency ?? 1;
  const choice = capJobs(values.jobs ?? cores, { cores, memoryBytes: totalmem() });
  if (choice.note !== undefined) toStderr(`run: ${choice.note}\n`);
  const jobs = choice.jobs;
  const pool = jobs > 1 ? new WorkerPool(jobs) : undefined;
  const commands = await planCommandTable();
  let manifest;
  try {
    manifest = await runPlan(planFile, {
      outDir,
      commands,
      report: writeReport,
      jobs,
      requireTargets: values["require-targets"] === true,
      ...(shard !== undefined ? { shard } : {}),
      // Every line a step writes carries its id, so parallel steps' logs stay apart.
      execute: (command: string, argv: readonly string[], id: string) =>
        pool !== undefined
          ? pool.run(command, argv, `${id}: `)
          : withStderrLabel(`${id}: `, () => commands[command].run(argv)),
    });
  } finally {
    pool?.close();
  }
  if (shard !== undefined) {
    const failed = manifest.steps.filter((s) => s.status !== "ok");
    toStderr(
      `run: shard ${shard.index} of ${shard.count}: ${
        manifest.steps.length - failed.length
      }/${manifest.steps.length} steps ok; targets and report come with quiver merge ${outDir}\n`,
    );
    for (const f of failed) toStderr(`  ${f.id}: ${f.status}: ${f.error ?? ""}\n`);
    if (failed.length > 0) process.exitCode = 1;
    return;
  }
  reportOutcome(manifest);
  if (values.history !== undefined && values.build !== undefined) {
    // The run is finished and its manifest written: the history reads it as `history add` does.
    const { addRun } = await import("./history.ts");
    await addRun(outDir, values.history, { build: values.build });
  }
}

/** The run's (or merge's) closing lines and exit code: 1 for a failed step, 4 for unmet targets when required. */
export function reportOutcome(manifest: Manifest, command = "run"): void {
  const failed = manifest.steps.filter((s) => s.status !== "ok");
  const targets = manifest.targets as { id: string; status: string; pass?: boolean }[];
  const passed = targets.filter((t) => t.pass === true).length;
  toStderr(
    `${command}: ${
      manifest.steps.length - failed.length
    }/${manifest.steps.length} steps ok, targets ${passed}/${targets.length} passed` +
      `${
        manifest.report !== undefined ? `, report ${join(manifest.out_dir, manifest.report)}` : ""
      }\n`,
  );
  if (failed.length > 0) {
    for (const f of failed) toStderr(`  ${f.id}: ${f.status}: ${f.error ?? ""}\n`);
    process.exitCode = 1;
  } else if (manifest.require_targets && passed < targets.length) {
    for (const t of targets.filter((t) => t.pass !== true)) {
      toStderr(`  target ${t.id}: ${t.status === "checked" ? "FAIL" : t.status}\n`);
    }
    process.exitCode = TARGETS_NOT_MET_EXIT;
  }
}
