/**
 * Reading quiver's result tables back, one way for every reader (damping,
 * compare, targets, the report): JSON as `formatJson` writes it, or CSV with
 * its `.meta.json` sidecar (table_file.ts), or a plain CSV from elsewhere
 * (no metadata). One strictness: a JSON column holds numbers (`null`, which
 * JSON writes for a value that was not finite, reads as NaN, never 0) or
 * text, never a mix; anything else is refused naming the file and column.
 * A CSV cell quiver wrote empty (a value that was not finite) reads as NaN
 * only in the columns its sidecar's `empty_cells` names (table.ts); any
 * other empty cell is refused.
 *
 * What the metadata of each analysis holds is checked by its own schema
 * (result_metadata.ts), not cast.
 *
 * @module
 */
import { resolve } from "node:path";
import { readFile } from "node:fs/promises";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../errors.ts";
import { type CsvTableOptions, parseNumericCsv } from "./csv_table.ts";
import type { ColumnValues, TableColumn } from "./table.ts";
import { readSidecar, sidecarPath } from "./table_file.ts";

/** A result table as read back. */
export interface ResultTable {
  /** The file it came from. */
  readonly file: string;
  /** The columns: numbers (NaN where the file held no finite value) or text. */
  readonly columns: readonly TableColumn<ColumnValues>[];
  /** The metadata quiver wrote, or undefined for a plain table. */
  readonly metadata?: Readonly<Record<string, unknown>>;
  /** The file line of each row (CSV only), for messages. */
  readonly lines?: readonly number[];
}

const jsonTableSchema = z.object({
  metadata: z.record(z.string(), z.unknown()).optional(),
  columns: z.array(z.object({
    name: z.string(),
    unit: z.string().optional(),
    values: z.union([z.array(z.number().nullable()), z.array(z.string())]),
  })),
});

/**
 * The numeric column of a result table by name, or undefined.
 *
 * @example
 * ```ts
 * import { numericColumn } from "./result_file.ts";
 * const t = { file: "x", columns: [{ name: "a", unit: "", values: new Float64Array([1]) }, { name: "s", unit: "", values: ["x"] }] };
 * if (numericColumn(t, "a")?.values[0] !== 1 || numericColumn(t, "s") !== undefined) throw new Error();
 * ```
 */
export function numericColumn(
  table: ResultTable,
  name: string,
): TableColumn<Float64Array> | undefined {
  const column = table.columns.find((c) => c.name === name);
  return column !== undefined && column.values instanceof Float64Array
    ? column as TableColumn<Float64Array>
    : undefined;
}

/**
 * Reads a result table: JSON, or CSV with its sidecar when it has one.
 *
 * @throws {QuiverError} for a file that cannot be read (usage), is not a
 * table, holds a JSON column that is neither numbers nor text, or whose
 * sidecar does not belong to it.
 *
 * @example
 * ```ts
 * import { readResultFile } from "./result_file.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/r.json`, JSON.stringify({ metadata: { kind: "rms" }, columns: [
 *   { name: "frequency_hz", unit: "", values: [0, 1] }, { name: "a", unit: "V", values: [null, 2] }] }));
 * const t = await readResultFile(`${dir}/r.json`);
 * if (t.metadata?.kind !== "rms" || !Number.isNaN(t.columns[1].values[0])) throw new Error();
 * ```
 */
export async function readResultFile(
  path: string,
  options: CsvTableOptions = {},
): Promise<ResultTable> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    const code = (error as { code?: string }).code;
    throw new QuiverError(
      `cannot read: ${code === "ENOENT" ? "no such file" : (error as Error).message}`,
      { file: resolve(path) },
      "usage",
    );
  }
  if (text.trimStart().startsWith("{")) {
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch (error) {
      throw new QuiverError(`not valid JSON: ${(error as Error).message}`, { file: path });
    }
    const parsed = jsonTableSchema.safeParse(json);
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      const where = issue.path.length > 0 ? ` at ${issue.path.join(".")}` : "";
      throw new QuiverError(
        `not a quiver table${where}: ${issue.message} (expected {metadata, columns: [{name, unit, values}]}, each column all numbers or all text)`,
        { file: path },
      );
    }
    return {
      file: path,
      columns: parsed.data.columns.map((c) => ({
        name: c.name,
        unit: c.unit ?? "",
        values: c.values.every((v): v is number | null => typeof v !== "string")
          ? Float64Array.from(c.values as (number | null)[], (v) => v === null ? NaN : v)
          : c.values as string[],
      })),
      ...(parsed.data.metadata !== undefined ? { metadata: parsed.data.metadata } : {}),
    };
  }
  // Which columns the writer left empty is known before the parse, from the sidecar.
  const declared = await declaredEmptyColumns(path);
  const table = parseNumericCsv(text, { ...options, file: path, emptyCells: declared.size > 0 });
  const metadata = (await readSidecar(path, text, table.header))?.metadata;
  table.header.forEach((h, c) => {
    if (declared.has(h.name)) return;
    const row = table.columns[c].findIndex((v) => Number.isNaN(v));
    if (row >= 0) {
      throw new QuiverError("empty cell where a number was expected", {
        file: path,
        line: table.lines[row],
        column: c + 1,
      });
    }
  });
  return {
    file: path,
    columns: table.header.map((h, i) => ({ name: h.name, unit: h.unit, values: table.columns[i] })),
    lines: table.lines,
    ...(metadata !== undefined ? { metadata } : {}),
  };
}

/** Names of the columns the sidecar of `path` says were written with empty cells. */
async function declaredEmptyColumns(path: string): Promise<Set<string>> {
  let json: unknown;
  try {
    json = JSON.parse(await readFile(sidecarPath(path), "utf8"));
  } catch {
    return new Set(); // no sidecar, or a bad one that readSidecar will name
  }
  const parsed = z.object({
    metadata: z.object({ empty_cells: z.array(z.object({ column: z.string() })) }),
  }).safeParse(json);
  return new Set(parsed.success ? parsed.data.metadata.empty_cells.map((e) => e.column) : []);
}
