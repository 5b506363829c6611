/**
 * Where a command's table goes: a file (written atomically) or stdout.
 *
 * @module
 */
import process from "node:process";
import { QuiverError } from "../lib/errors.ts";
import { writeFileAtomic } from "../lib/io/atomic_write.ts";
import { writeCsvPair } from "../lib/io/table_file.ts";
import {
  type ColumnValues,
  formatCsv,
  formatJson,
  noteEmptyCells,
  type Table,
  type TableMetadata,
} from "../lib/io/table.ts";

/** Output formats of table-writing commands. */
export type TableFormat = "csv" | "json";

/**
 * The format to write: the one asked for, else JSON for a `.json` path, else CSV.
 *
 * @example
 * ```ts
 * import { resolveFormat } from "./output.ts";
 * if (resolveFormat(undefined, "s.json") !== "json") throw new Error();
 * ```
 */
export function resolveFormat(
  format: TableFormat | undefined,
  out: string | undefined,
): TableFormat {
  if (format !== undefined) return format;
  return out !== undefined && out.toLowerCase().endsWith(".json") ? "json" : "csv";
}

/**
 * Writes the table to `out` atomically, or to stdout when `out` is undefined.
 * A CSV file gets a sidecar `<out>.meta.json` holding the metadata, the
 * column names and units and the CSV's hash, written as a pair (table_file.ts),
 * so that a CSV result stays traceable (JSON output carries its metadata inside).
 * Cells that hold no finite number are listed in `metadata.empty_cells`.
 */
export async function writeTable(
  written: Table<TableMetadata, ColumnValues>,
  format: TableFormat,
  out: string | undefined,
): Promise<void> {
  // Values that are not finite are written empty (CSV) or null (JSON): the metadata says why.
  const table = noteEmptyCells(written);
  const text = format === "json" ? formatJson(table) : formatCsv(table);
  if (out === undefined) {
    process.stdout.write(text);
    return;
  }
  try {
    if (format === "csv") {
      await writeCsvPair(out, text, table.columns, table.metadata);
    } else {
      await writeFileAtomic(out, text);
    }
  } catch (error) {
    if (error instanceof QuiverError) throw error; // says what it is already (a target that is no file)
    const code = (error as { code?: string }).code;
    throw new QuiverError(
      `cannot write: ${
        code === "ENOENT"
          ? "the folder does not exist"
          : error instanceof Error
          ? error.message
          : String(error)
      }`,
      { file: out },
      "usage",
    );
  }
}

/**
 * Writes a command's main table with `source` prepended to its metadata, in
 * the format the options ask for (see {@linkcode resolveFormat}).
 */
export async function writeResult(
  table: Table<TableMetadata, ColumnValues>,
  source: string,
  values: { format?: TableFormat; out?: string; start?: number; end?: number },
): Promise<void> {
  const slice = values.start !== undefined || values.end !== undefined
    ? { slice_s: { start: values.start ?? null, end: values.end ?? null } }
    : {};
  const traced = { ...table, metadata: { source, ...slice, ...table.metadata } };
  await writeTable(traced, resolveFormat(values.format, values.out), values.out);
}
