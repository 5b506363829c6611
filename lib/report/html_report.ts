/**
 * The campaign report: one self-contained HTML file (inline SVG and CSS, no
 * scripts, no network) with the targets first, then every result as plots
 * and tables, then the trace of what was produced from what. Each plot is
 * also written as a standalone SVG next to the report, under `figures/`.
 *
 * Each step's section comes from the section module of its command
 * (section_loaders.ts); the page around them from page.ts.
 *
 * @module
 */
import { lstat, mkdir } from "node:fs/promises";
import { join } from "node:path";
import { writeFileAtomic } from "../io/atomic_write.ts";
import { uniqueFileNames } from "../io/file_name.ts";
import { QuiverError } from "../errors.ts";
import { commonMetadata } from "../io/result_metadata.ts";
import type { Manifest } from "../plan/runner.ts";
import type { Plan } from "../plan/schema.ts";
import type { TargetOutcome } from "../plan/target_eval.ts";
import { type ContentsEntry, sectionAnchor, sectionStatus } from "./contents.ts";
import { reportPage } from "./page.ts";
import { recordingsSection } from "./recordings_section.ts";
import type { CurveLimit, ManifestStep, ReportSection } from "./section.ts";
import { readResult } from "./section_data.ts";
import { loaderFor } from "./section_loaders.ts";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";

/**
 * What a section's source line names: the files the run read for the step
 * (from the manifest, which every step has), else the source its result
 * names; "no recorded input" when neither says.
 */
function sourceNames(
  step: ManifestStep,
  common: { source?: string; test?: string },
): string {
  const names = step.inputs.map((i) => String(i.path).split("/").pop() ?? "");
  const fromResult = common.source ?? common.test;
  if (names.length === 0 && fromResult !== undefined) names.push(fromResult.split("/").pop() ?? "");
  const shown = names.filter((n) => n !== "");
  return shown.length > 0 ? shown.join(", ") : "no recorded input";
}

/** The section of a step whose result cannot be shown, with the reason as its note. */
function failedSection(heading: string, note: string): ReportSection {
  return { heading, note, figures: [], failed: true };
}

/**
 * A step's section: from its command's section module, or failed (the step
 * failed, or its result is unreadable or not what its command writes);
 * undefined for a command without a section module. Notes the step in
 * `warned` when its result carries warnings.
 */
async function stepSection(
  step: ManifestStep,
  { title, outDir, limits, warned, table }: {
    title: string;
    outDir: string;
    limits: readonly CurveLimit[];
    warned: Set<string>;
    table: AnalysisTable;
  },
): Promise<ReportSection | undefined> {
  if (step.status !== "ok") {
    return failedSection(
      title,
      `${step.command}: ${step.status}${step.error !== undefined ? ` — ${step.error}` : ""}`,
    );
  }
  const result = await readResult(join(outDir, `${step.id}.json`));
  if (result instanceof QuiverError) {
    return failedSection(title, `cannot show the result: ${result.message}`);
  }
  const common = commonMetadata(result);
  const warnings = common.warnings ?? [];
  if (warnings.length > 0) warned.add(step.id);
  const note = `${step.command} of ${sourceNames(step, common)}${
    warnings.length > 0 ? `. Warnings: ${warnings.join("; ")}` : ""
  }`;
  const load = loaderFor(step.command, table);
  if (load === undefined) return undefined;
  // A result whose metadata is not what its command writes is named, not drawn from guesses.
  try {
    const { section } = await load();
    return await section({ step, title, result, outDir, note, limits });
  } catch (error) {
    if (!(error instanceof QuiverError)) throw error;
    return failedSection(title, `cannot show the result: ${error.message}`);
  }
}

/**
 * `<outDir>/figures`, made if missing; refused when it is a link (it could
 * lead out of the folder) or not a folder.
 */
async function figuresFolder(outDir: string): Promise<string> {
  const dir = join(outDir, "figures");
  let info;
  try {
    info = await lstat(dir);
  } catch {
    await mkdir(dir);
    return dir;
  }
  if (info.isSymbolicLink() || !info.isDirectory()) {
    throw new QuiverError(
      `${dir} is ${
        info.isSymbolicLink() ? "a link" : "not a folder"
      }: the report writes its figures only into a folder of its own inside the output folder`,
      { file: dir },
      "usage",
    );
  }
  return dir;
}

/**
 * Writes `<outDir>/<file>` and `<outDir>/figures/*.svg` from a finished run.
 * Returns the report's path. Each step's section comes from its analysis's
 * descriptor in `table` (default: quiver's analyses).
 *
 * @example
 * ```ts
 * import { writeReport } from "./html_report.ts";
 * import { runPlan } from "../plan/runner.ts";
 * import { mkdtemp, readFile, writeFile } from "node:fs/promises";
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
 * await runPlan(`${dir}/plan.json`, { outDir: `${dir}/out`, commands: { spectrum }, progress: { start() {}, end() {} }, report: writeReport });
 * if (!(await readFile(`${dir}/out/report.html`, "utf8")).includes("<svg")) throw new Error();
 * ```
 */
export async function writeReport(
  outDir: string,
  manifest: Manifest,
  plan: Plan,
  table: AnalysisTable = ANALYSES,
): Promise<string> {
  const titles = new Map<string, string>();
  for (const a of plan.analyses) titles.set(a.id, a.title ?? a.id);
  for (const c of plan.comparisons) titles.set(c.id, c.title ?? c.id);
  const outcomes = new Map((manifest.targets as TargetOutcome[]).map((t) => [t.id, t]));
  const limitsOf = (analysis: string): CurveLimit[] =>
    plan.targets.flatMap((t) =>
      t.type === "limit_curve" && t.of.analysis === analysis
        ? [{ id: t.id, channel: t.of.channel, points: t.points, outcome: outcomes.get(t.id) }]
        : []
    );
  const sections: ReportSection[] = [];
  // Each step's section, for its anchor and status in the contents.
  const stepOf = new Map<ReportSection, ManifestStep>();
  const warned = new Set<string>();
  for (const step of manifest.steps) {
    const section = await stepSection(step, {
      title: titles.get(step.id) ?? step.id,
      outDir,
      limits: limitsOf(step.id),
      warned,
      table,
    });
    if (section === undefined) continue;
    sections.push(section);
    stepOf.set(section, step);
  }
  // The raw time histories of the recordings, after the results they were read for.
  sections.push(await recordingsSection(plan, manifest.plan.path));
  // Figure names hold channel names read from data: each becomes a safe, distinct file name.
  const allFigures = sections.flatMap((s) => s.figures);
  const fileOf = new Map(
    uniqueFileNames(allFigures.map((f) => f.name)).map((file, i) => [allFigures[i], file]),
  );
  const figuresDir = await figuresFolder(outDir);
  for (const [f, file] of fileOf) {
    await writeFileAtomic(join(figuresDir, `${file}.svg`), f.svg + "\n");
  }
  const planTargets = plan.targets.map((t) => ({ id: t.id, analysis: t.of.analysis }));
  const entries: ContentsEntry[] = sections.map((s) => {
    const step = stepOf.get(s);
    return {
      anchor: sectionAnchor(step?.id ?? s.heading),
      heading: s.heading,
      ...sectionStatus(s, step, planTargets, outcomes, warned),
    };
  });
  const path = join(outDir, plan.report?.file ?? "report.html");
  await writeFileAtomic(path, reportPage({ manifest, plan, sections, entries, fileOf }));
  return path;
}
