/**
 * `quiver report`: (re)writes the HTML report of a finished run.
 *
 * @module
 */
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import process from "node:process";
import { z } from "zod";
import { QuiverError } from "../lib/errors.ts";
import { loadPlan, type Manifest } from "../lib/plan/runner.ts";
import { writeReport } from "../lib/report/html_report.ts";
import { type OptionSpec, parseCommandArgs, usageError } from "./args.ts";

/** One-line summary for the command list. */
export const summary = "writes the self-contained HTML report of a finished run from its manifest";

/** The command's help text. */
export const help = `quiver report OUT_DIR

Reads OUT_DIR/manifest.json and the results beside it, and writes the
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
  let manifest: Manifest;
  try {
    manifest = JSON.parse(await readFile(join(outDir, "manifest.json"), "utf8")) as Manifest;
  } catch {
    throw new QuiverError(
      "no readable manifest.json here; run a plan first",
      { file: outDir },
      "usage",
    );
  }
  const { plan } = await loadPlan(manifest.plan.path);
  const path = await writeReport(outDir, manifest, {
    ...plan,
    report: plan.report ?? { file: "report.html" },
  });
  process.stderr.write(`report: ${path}\n`);
}
