/**
 * Before a run writes into a folder: removing what the previous run's
 * manifest lists and this project can prove it wrote, so that the folder
 * never holds results of two runs side by side, and refusing to replace
 * anything else.
 *
 * @module
 */
import { existsSync, lstatSync } from "node:fs";
import { readFile, rm, rmdir } from "node:fs/promises";
import { join, relative, resolve, sep } from "node:path";
import { QuiverError } from "../errors.ts";
import { realPathOf } from "../io/output_paths.ts";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import {
  FIGURES_FOLDER,
  isFigureName,
  isReportFileName,
  outputFileName,
  outputWrites,
} from "./campaign_paths.ts";
import { hashFile } from "./file_record.ts";
import { type FileRecord, manifestSchema } from "./manifest.ts";

/**
 * Removes what the previous run's manifest lists and this project can prove
 * it wrote, then the manifest itself, so that the folder never holds results
 * of two runs side by side. A listed file is removed only when its name is
 * one the runner gives (`<id>.json`, `<id>_<part>.json`, the report's
 * `<name>.html`, `figures/<name>.svg`), it lies inside the folder (no link
 * on the way, the file itself no link), it is none of this plan's inputs
 * (`inputs`: real paths), and its size and SHA-256 are still those the
 * manifest recorded (`table` says which outputs of a step's command are
 * CSV). Everything else is left, and named in `left`.
 */
export async function removePreviousRun(
  outDir: string,
  manifestFile: string,
  inputs: ReadonlySet<string>,
  writes: readonly string[],
  table: AnalysisTable = ANALYSES,
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
        expected = /^[A-Za-z0-9_-]+$/.test(step.id)
          ? outputFileName(step.id, key, outputWrites(table.get(step.command), key))
          : undefined;
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
