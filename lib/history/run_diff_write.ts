/**
 * Writing `quiver diff`'s folder: each spectral step's table `<id>.csv`
 * (with its sidecar, lib/io/table_file.ts), `summary.json` and `diff.html`,
 * each atomically. The folder must not be either run's.
 *
 * @module
 */
import { mkdir } from "node:fs/promises";
import { join } from "node:path";
import { QuiverError } from "../errors.ts";
import { writeFileAtomic } from "../io/atomic_write.ts";
import { realPathOf } from "../io/output_paths.ts";
import { formatCsv, noteEmptyCells } from "../io/table.ts";
import { writeCsvPair } from "../io/table_file.ts";
import type { ReportSection } from "../report/section.ts";
import type { RunDiff } from "./run_diff.ts";
import { diffPage } from "./run_diff_page.ts";

/** The files of a diff folder besides the step tables. */
export const DIFF_FILES = { summary: "summary.json", page: "diff.html" } as const;

/**
 * Writes the diff into `outDir` (made when absent) and returns the files written.
 *
 * @throws {QuiverError} (usage) when `outDir` is one of the two runs' folders.
 */
export async function writeRunDiff(
  diff: RunDiff,
  outDir: string,
  extra: readonly ReportSection[] = [],
): Promise<string[]> {
  await mkdir(outDir, { recursive: true });
  const out = realPathOf(outDir);
  for (const run of [diff.summary.baseline, diff.summary.candidate]) {
    if (realPathOf(run.dir) === out) {
      throw new QuiverError(
        "the diff's folder is one of the runs' folders; give another --out-dir (the diff must not mix with a run's results)",
        { file: outDir },
        "usage",
      );
    }
  }
  const written: string[] = [];
  for (const [id, table] of diff.tables) {
    const noted = noteEmptyCells(table);
    const path = join(outDir, `${id}.csv`);
    await writeCsvPair(path, formatCsv(noted), noted.columns, { ...noted.metadata });
    written.push(path);
  }
  const summary = join(outDir, DIFF_FILES.summary);
  await writeFileAtomic(summary, JSON.stringify(diff.summary, null, 2) + "\n");
  const page = join(outDir, DIFF_FILES.page);
  await writeFileAtomic(page, diffPage(diff, extra));
  return [...written, summary, page];
}
