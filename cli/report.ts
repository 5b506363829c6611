/**
 * `quiver report`: (re)writes the HTML report of a finished run.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { resolve, sep } from "node:path";
import { sha256Hex } from "../lib/io/table_file.ts";
import { realPathOf } from "../lib/io/output_paths.ts";
import { manifestSchema } from "../lib/plan/manifest.ts";
import { MANIFEST_FILE } from "../lib/plan/runner.ts";
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../lib/errors.ts";
import { loadPlan, type Manifest } from "../lib/plan/runner.ts";
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
  const manifest = await verifiedManifest(outDir);
  const plan = await unchangedPlan(manifest);
  // The verdicts shown are the ones the verified results give, never the manifest's own words.
  const failed = new Set(manifest.steps.filter((s) => s.status !== "ok").map((s) => s.id));
  const targets = await evaluateTargets(plan, outDir, failed);
  if (JSON.stringify(targets) !== JSON.stringify(manifest.targets)) {
    throw new QuiverError(
      "the manifest's target verdicts are not those its results give (edited after the run?), so no report is written: run the plan again",
      { file: join(outDir, MANIFEST_FILE) },
    );
  }
  const path = await writeReport(outDir, manifest, {
    ...plan,
    report: plan.report ?? { file: "report.html" },
  });
  toStderr(`report: ${path}\n`);
}

/**
 * The plan the manifest names, refused unless it is still the file the run
 * read (size and SHA-256): a plan edited since could name another report
 * file, other targets or other titles than the results were made under.
 */
async function unchangedPlan(manifest: Manifest): Promise<Plan> {
  const { plan, text } = await loadPlan(manifest.plan.path);
  const bytes = new TextEncoder().encode(text);
  if (bytes.length !== manifest.plan.bytes || sha256Hex(bytes) !== manifest.plan.sha256) {
    throw new QuiverError(
      "the plan changed since the run (its hash differs from the manifest's), so no report is written: run the plan again",
      { file: manifest.plan.path },
    );
  }
  return plan;
}

/**
 * The folder's manifest, validated by its schema, of a finished run, with
 * every listed output still the file the run wrote (size and SHA-256).
 *
 * @throws {QuiverError} naming what does not hold.
 */
async function verifiedManifest(outDir: string): Promise<Manifest> {
  let json: unknown;
  try {
    json = JSON.parse(await readFile(join(outDir, MANIFEST_FILE), "utf8"));
  } catch {
    throw new QuiverError(
      "no readable manifest.json here; run a plan first",
      { file: outDir },
      "usage",
    );
  }
  const parsed = manifestSchema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new QuiverError(
      `manifest.json is not a quiver manifest: ${
        issue.path.join(".") || "(top level)"
      }: ${issue.message}`,
      { file: outDir },
    );
  }
  const manifest = parsed.data;
  if (manifest.status === "running") {
    throw new QuiverError(
      "the run that wrote this folder did not finish (its manifest still says running): run the plan again",
      { file: outDir },
    );
  }
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
