/**
 * Tables of numbers, the form every analysis hands to a writer: named
 * columns of equal length plus metadata, written as CSV or JSON.
 *
 * @module
 */

/** What a column can hold: numbers, or text labels (e.g. a hit's status). */
export type ColumnValues = Float64Array | readonly string[];

/** One column of a table; numeric unless said otherwise. */
export interface TableColumn<V extends ColumnValues = Float64Array> {
  /** Column name as it appears in the CSV header. */
  readonly name: string;
  /** Unit of the values, "" for none; CSV headers show it as ` [unit]`. */
  readonly unit: string;
  /** The values, one per row. */
  readonly values: V;
}

/** Metadata of a table whose analysis has no schema: any JSON-serialisable fields. */
export type TableMetadata = Readonly<Record<string, unknown>>;

/**
 * A table with the metadata that makes it traceable. `M` types the
 * metadata: an analysis's result is a `Table<SpectrumMetadata>` etc., the
 * type its metadata schema gives (so a producer that renames a key fails
 * the type check); `V` is what its columns hold.
 */
export interface Table<
  M extends TableMetadata = TableMetadata,
  V extends ColumnValues = Float64Array,
> {
  /** The columns, all of one length. */
  readonly columns: readonly TableColumn<V>[];
  /** Anything a reader needs to reproduce the numbers (JSON-serialisable). */
  readonly metadata: Readonly<M>;
}

/**
 * Header text of a column: `name [unit]`, or `name` without a unit. A name
 * that itself ends in a bracketed group (`a[1]`) gets an empty unit written
 * (`a[1] []`), as a reader takes the last bracketed group at the end for the
 * unit: so the header reads back as the same name and unit.
 *
 * @example
 * ```ts
 * import { columnHeader } from "./table.ts";
 * if (columnHeader({ name: "mic", unit: "Pa^2/Hz", values: new Float64Array() }) !== "mic [Pa^2/Hz]") throw new Error();
 * if (columnHeader({ name: "a[1]", unit: "", values: new Float64Array() }) !== "a[1] []") throw new Error();
 * ```
 */
export function columnHeader(column: TableColumn<ColumnValues>): string {
  if (column.unit === "") return /\]\s*$/.test(column.name) ? `${column.name} []` : column.name;
  return `${column.name} [${column.unit}]`;
}

/**
 * The characters that make a spreadsheet read a cell as a formula: `=`, `+`,
 * `-`, `@`, tab and carriage return (OWASP, "CSV Injection",
 * https://owasp.org/www-community/attacks/CSV_Injection). A text cell that
 * starts with one of them, after any number of `'`, gets one more leading
 * `'`, which spreadsheets show as text. The `'`s already there are counted so
 * that the guard can be undone exactly ({@linkcode restoreFormula}): `'+z`
 * (a text that really starts with `'`) is written `''+z` and reads back
 * `'+z`.
 */
const GUARDED = /^'*[=+\-@\t\r]/;

/**
 * A text cell made safe for spreadsheets (see {@linkcode GUARDED}): a leading
 * `'` before formula-like text. Numbers are never text cells, so a numeric
 * `-1.5` is written as it is; the text `-x` becomes `'-x`.
 *
 * @example
 * ```ts
 * import { neutraliseFormula } from "./table.ts";
 * if (neutraliseFormula("=HYPERLINK(1)") !== "'=HYPERLINK(1)" || neutraliseFormula("acc") !== "acc") throw new Error();
 * if (neutraliseFormula("-x") !== "'-x" || neutraliseFormula("'+z") !== "''+z") throw new Error();
 * ```
 */
export function neutraliseFormula(text: string): string {
  return GUARDED.test(text) ? `'${text}` : text;
}

/**
 * Undoes {@linkcode neutraliseFormula}: the text a guarded cell held. Text
 * that was not guarded comes back unchanged, so quiver's own tables read
 * back to the same text (`'+z` → `+z`, `''+z` → `'+z`, `don't` stays).
 *
 * @example
 * ```ts
 * import { neutraliseFormula, restoreFormula } from "./table.ts";
 * for (const t of ["+z", "-x", "=a", "'+z", "@b", "acc", "'quoted'", "\tx"]) {
 *   if (restoreFormula(neutraliseFormula(t)) !== t) throw new Error(t);
 * }
 * ```
 */
export function restoreFormula(text: string): string {
  return text.startsWith("'") && GUARDED.test(text.slice(1)) ? text.slice(1) : text;
}

function csvCell(text: string): string {
  const safe = neutraliseFormula(text);
  return /[",\n\r]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
}

/**
 * Why a number was not finite, by its kind (IEEE 754 overflow, −∞ of a logarithm, 0/0).
 *
 * @example
 * ```ts
 * import { nonFiniteReason } from "./table.ts";
 * if (!nonFiniteReason(-Infinity).includes("dB") || !nonFiniteReason(Infinity).includes("overflow")) throw new Error();
 * ```
 */
export function nonFiniteReason(value: number): string {
  if (value === -Infinity) {
    return "-Infinity: the dB (logarithm) of zero, e.g. a line or band with no power";
  }
  if (value === Infinity) {
    return "Infinity: beyond the largest double, about 1.8e308 (IEEE 754 overflow)";
  }
  return "NaN: no defined value (e.g. 0/0 where the input had no power)";
}

/** One column's cells that held no finite number, as the metadata records them. */
export interface EmptyCells {
  /** Column name. */
  readonly column: string;
  /** How many cells are empty (CSV) / null (JSON). */
  readonly count: number;
  /** 0-based row of the first. */
  readonly first_row: number;
  /** Why, by the kind of the first value (see {@linkcode nonFiniteReason}). */
  readonly reason: string;
}

/**
 * The table with `metadata.empty_cells` listing every numeric column that
 * holds values that are not finite (they are written as empty CSV cells or
 * JSON nulls, never as `NaN`/`Infinity` text), or the table itself when all
 * are finite. Every table writer calls this, so no such cell goes unexplained.
 *
 * @example
 * ```ts
 * import { noteEmptyCells } from "./table.ts";
 * const t = noteEmptyCells({ metadata: {}, columns: [{ name: "level", unit: "dB", values: new Float64Array([-Infinity, 3]) }] });
 * const e = t.metadata.empty_cells as { column: string; count: number }[];
 * if (e[0].column !== "level" || e[0].count !== 1) throw new Error();
 * ```
 */
export function noteEmptyCells<M extends TableMetadata, V extends ColumnValues>(
  table: Table<M, V>,
): Table<M, V> {
  const notes: EmptyCells[] = [];
  for (const column of table.columns) {
    const values = column.values;
    if (!(values instanceof Float64Array)) continue;
    let count = 0, first = -1;
    for (let i = 0; i < values.length; i++) {
      if (values[i] - values[i] !== 0) {
        count++;
        if (first < 0) first = i;
      }
    }
    if (count > 0) {
      notes.push({
        column: column.name,
        count,
        first_row: first,
        reason: nonFiniteReason(values[first]),
      });
    }
  }
  return notes.length === 0
    ? table
    : { ...table, metadata: { ...table.metadata, empty_cells: notes } };
}

/**
 * Formats a table as CSV: one header row, then rows of shortest round-trip
 * numbers (so no digit is lost). Metadata is not part of the CSV. A number
 * that is not finite is an empty cell; text cells are guarded against
 * spreadsheet formulas ({@linkcode neutraliseFormula}).
 *
 * @throws {RangeError} when columns differ in length.
 *
 * @example
 * ```ts
 * import { formatCsv } from "./table.ts";
 * const csv = formatCsv({ metadata: {}, columns: [
 *   { name: "frequency_hz", unit: "", values: new Float64Array([0, 0.5]) },
 *   { name: "a", unit: "V", values: new Float64Array([1, 2]) }] });
 * if (csv !== "frequency_hz,a [V]\n0,1\n0.5,2\n") throw new Error();
 * ```
 */
export function formatCsv(table: Table<TableMetadata, ColumnValues>): string {
  const rows = table.columns[0]?.values.length ?? 0;
  if (table.columns.some((c) => c.values.length !== rows)) {
    throw new RangeError("every column of a table must have the same length");
  }
  const lines = [table.columns.map((c) => csvCell(columnHeader(c))).join(",")];
  for (let r = 0; r < rows; r++) {
    lines.push(
      table.columns.map((c) => {
        const value = c.values[r];
        if (typeof value === "string") return csvCell(value);
        // No `NaN`/`Infinity` text: an empty cell, explained by noteEmptyCells.
        return value - value === 0 ? String(value) : "";
      }).join(","),
    );
  }
  return lines.join("\n") + "\n";
}

/**
 * Formats a table as JSON: `{ "metadata": {…}, "columns": [{ "name", "unit", "values" }] }`.
 * A number that is not finite is `null` (as JSON itself writes it).
 *
 * @example
 * ```ts
 * import { formatJson } from "./table.ts";
 * const json = JSON.parse(formatJson({ metadata: { rate: 8 }, columns: [{ name: "a", unit: "", values: new Float64Array([1]) }] }));
 * if (json.columns[0].values[0] !== 1 || json.metadata.rate !== 8) throw new Error();
 * ```
 */
export function formatJson(table: Table<TableMetadata, ColumnValues>): string {
  return JSON.stringify(
    {
      metadata: table.metadata,
      columns: table.columns.map((c) => ({
        name: c.name,
        unit: c.unit,
        values: Array.from<number | string>(c.values),
      })),
    },
    null,
    2,
  ) + "\n";
}
