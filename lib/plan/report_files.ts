/**
 * Writing the report of a run and listing what it wrote (the report file
 * and the figures it created or replaced), so that the next run removes
 * exactly these.
 *
 * @module
 */
import { readdir } from "node:fs/promises";
import { join, relative } from "node:path";
import { FIGURES_FOLDER, isFigureName, isReportFileName } from "./campaign_paths.ts";
import { fileStamp, record } from "./file_record.ts";
import type { FileRecord } from "./manifest.ts";

/**
 * Writes the report with `write` and lists what it wrote: the report file
 * and every figure under `figures/` that it created or replaced, each with
 * its size and SHA-256, so that the next run removes exactly these. Files
 * already there and left unchanged are not listed. The returned path is
 * checked to lie directly in the folder.
 *
 * @example
 * ```ts
 * import { writeRecordedReport } from "./report_files.ts";
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
