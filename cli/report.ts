/**
 * `quiver report`: (re)writes the HTML report of a finished run.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { existsSync } from "node:fs";
import { resolve, sep } from "node:path";
import { sha256Hex } from "../lib/io/table_file.ts";
import { realPathOf } from "../lib/io/output_paths.ts";
import { readFinishedManifest } from "../lib/plan/finished_run.ts";
import { MANIFEST_FILE } from "../lib/plan/runner.ts";
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../lib/errors.ts";
import { loadPlan, type Manifest, planSteps, writeRecordedReport } from "../lib/plan/runner.ts";
import { acquireFolderLock } from "../lib/plan/folder_lock.ts";
import { writeFileAtomic } from "../lib/io/atomic_write.ts";
import { planCommandTable } from "./plan_commands.ts";
import type { Plan } from "../lib/plan/schema.ts";
import { evaluateTargets } from "../lib/plan/target_eval.ts";
import { writeReport } from "../lib/report/html_report.ts";
import { type OptionSpec, parseCommandArgs, usageError } from "./args.ts";

/** One-line summary for the command list. */
export const summary = "writes the self-contained HTML report of a finished run from its manifest";

/** The command's help text. */
export const help = `quiver report OUT_DIR

Reads OUT_DIR/manifest.json and the results beside it, checks that the
run finished and that every result is still the file it wrote (size and
SHA-256), and writes the
report named in the plan (default report.html) with its figures/ folder:
one self-contained HTML file (inline SVG and CSS, nothing fetched), the
targets first, then every result, then the trace of inputs and outputs.
`;

/** parseArgs spec of the options. */
export const options: OptionSpec = {};

/** zod schema of the options. */
export const schema = z.strictObject({});

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`report takes one output folder, got ${positionals.length}`);
  }
  const [outDir] = positionals;
  if (!existsSync(join(outDir, MANIFEST_FILE))) {
    throw new QuiverError("no manifest.json here; run a plan first", { file: outDir }, "usage");
  }
  // An unfinished run is refused before the lock is asked for: taking over a killed run's
  // lock here would hide it from the next run, which reports it.
  await unfinishedRefused(outDir);
  // The folder's one lock, as every run takes it: no run, shard or merge writes meanwhile.
  const lock = await acquireFolderLock(outDir, { kind: "report" });
  let path: string;
  try {
    path = await reportLocked(outDir);
  } finally {
    await lock.release();
  }
  toStderr(`report: ${path}\n`);
}

/** Refuses a folder whose manifest says its run did not finish (read only, no lock). */
async function unfinishedRefused(outDir: string): Promise<void> {
  let status: unknown;
  try {
    status = JSON.parse(await readFile(join(outDir, MANIFEST_FILE), "utf8"))?.status;
  } catch {
    return; // unreadable: verifiedManifest says so under the lock
  }
  if (status === "running" || status === "aborted") {
    throw new QuiverError(
      `the run that wrote this folder did not finish (its manifest says ${status}): run the plan again`,
      { file: outDir },
    );
  }
}

/** Checks the folder as `run` does, writes the report, and lists it and its figures. */
async function reportLocked(outDir: string): Promise<string> {
  const manifest = await verifiedManifest(outDir);
  const plan = await unchangedPlan(manifest);
  // Every path the report writes (its file, figures/) checked by the run's own check.
  planSteps(plan, manifest.plan.path, outDir, await planCommandTable());
  // The verdicts shown are the ones the verified results give, never the manifest's own words.
  const failed = new Set(manifest.steps.filter((s) => s.status !== "ok").map((s) => s.id));
  const targets = await evaluateTargets(plan, outDir, failed);
  if (JSON.stringify(targets) !== JSON.stringify(manifest.targets)) {
    throw new QuiverError(
      "the manifest's target verdicts are not those its results give (edited after the run?), so no report is written: run the plan again",
      { file: join(outDir, MANIFEST_FILE) },
    );
  }
  const written = await writeRecordedReport(
    outDir,
    () =>
      writeReport(outDir, manifest, { ...plan, report: plan.report ?? { file: "report.html" } }),
  );
  // The next run's clean-up removes figures only from this list.
  await writeFileAtomic(
    join(outDir, MANIFEST_FILE),
    JSON.stringify({ ...manifest, report: written.report, report_files: written.files }, null, 2) +
      "\n",
  );
  return join(outDir, written.report);
}

/**
 * The plan the manifest names, refused unless it is still the file the run
 * read (size and SHA-256): a plan edited since could name another report
 * file, other targets or other titles than the results were made under.
 */
async function unchangedPlan(manifest: Manifest): Promise<Plan> {
  let bytes: Uint8Array;
  try {
    bytes = await readFile(manifest.plan.path);
  } catch {
    throw new QuiverError("cannot read the plan the run read", { file: manifest.plan.path });
  }
  // Compared before the plan is read for its content: an edited plan is named as such.
  if (bytes.length !== manifest.plan.bytes || sha256Hex(bytes) !== manifest.plan.sha256) {
    throw new QuiverError(
      "the plan changed since the run (its hash differs from the manifest's), so no report is written: run the plan again",
      { file: manifest.plan.path },
    );
  }
  const { plan } = await loadPlan(manifest.plan.path);
  return plan;
}

/**
 * The folder's manifest, validated by its schema, of a finished run, with
 * every listed output still the file the run wrote (size and SHA-256).
 *
 * @throws {QuiverError} naming what does not hold.
 */
async function verifiedManifest(outDir: string): Promise<Manifest> {
  const manifest = await readFinishedManifest(outDir, {
    missing: "run a plan first",
    unfinished: "run the plan again",
  });
  const realOut = realPathOf(outDir);
  const problems: string[] = [];
  for (const step of manifest.steps) {
    for (const output of Object.values(step.outputs)) {
      const path = resolve(outDir, output.path);
      if (!realPathOf(path).startsWith(realOut + sep)) {
        problems.push(`${output.path} lies outside the folder`);
        continue;
      }
      let bytes: Uint8Array;
      try {
        bytes = await readFile(path);
      } catch {
        problems.push(`${output.path} is missing`);
        continue;
      }
      if (bytes.length !== output.bytes || sha256Hex(bytes) !== output.sha256) {
        problems.push(`${output.path} is not the file the run wrote (its hash differs)`);
      }
    }
  }
  if (problems.length > 0) {
    throw new QuiverError(
      `the results do not match the manifest, so no report is written: ${problems.join("; ")}`,
      { file: outDir },
    );
  }
  return manifest;
}
