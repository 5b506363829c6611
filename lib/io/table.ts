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

/** A table with the metadata that makes it traceable. */
export interface Table<V extends ColumnValues = Float64Array> {
  /** The columns, all of one length. */
  readonly columns: readonly TableColumn<V>[];
  /** Anything a reader needs to reproduce the numbers (JSON-serialisable). */
  readonly metadata: Readonly<Record<string, unknown>>;
}

/**
 * Header text of a column: `name [unit]`, or `name` without a unit.
 *
 * @example
 * ```ts
 * import { columnHeader } from "./table.ts";
 * if (columnHeader({ name: "mic", unit: "Pa^2/Hz", values: new Float64Array() }) !== "mic [Pa^2/Hz]") throw new Error();
 * ```
 */
export function columnHeader(column: TableColumn<ColumnValues>): string {
  return column.unit === "" ? column.name : `${column.name} [${column.unit}]`;
}

/**
 * A text cell that a spreadsheet would run as a formula (it starts with `=`,
 * `+`, `@`, a tab or a carriage return) gets a leading `'`, which spreadsheets
 * show as text (common practice from spreadsheet-injection guidance, e.g.
 * OWASP "CSV Injection"). Numbers are never text cells, so `-1.5` stays a number.
 *
 * @example
 * ```ts
 * import { neutraliseFormula } from "./table.ts";
 * if (neutraliseFormula("=HYPERLINK(1)") !== "'=HYPERLINK(1)" || neutraliseFormula("acc") !== "acc") throw new Error();
 * ```
 */
export function neutraliseFormula(text: string): string {
  return /^[=+@\t\r]/.test(text) ? `'${text}` : text;
}

function csvCell(text: string): string {
  const safe = neutraliseFormula(text);
  return /[",\n\r]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
}

/**
 * Formats a table as CSV: one header row, then rows of shortest round-trip
 * numbers (so no digit is lost). Metadata is not part of the CSV.
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
export function formatCsv(table: Table<ColumnValues>): string {
  const rows = table.columns[0]?.values.length ?? 0;
  if (table.columns.some((c) => c.values.length !== rows)) {
    throw new RangeError("every column of a table must have the same length");
  }
  const lines = [table.columns.map((c) => csvCell(columnHeader(c))).join(",")];
  for (let r = 0; r < rows; r++) {
    lines.push(
      table.columns.map((c) => {
        const value = c.values[r];
        return typeof value === "string" ? csvCell(value) : String(value);
      }).join(","),
    );
  }
  return lines.join("\n") + "\n";
}

/**
 * Formats a table as JSON: `{ "metadata": {…}, "columns": [{ "name", "unit", "values" }] }`.
 *
 * @example
 * ```ts
 * import { formatJson } from "./table.ts";
 * const json = JSON.parse(formatJson({ metadata: { rate: 8 }, columns: [{ name: "a", unit: "", values: new Float64Array([1]) }] }));
 * if (json.columns[0].values[0] !== 1 || json.metadata.rate !== 8) throw new Error();
 * ```
 */
export function formatJson(table: Table<ColumnValues>): string {
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
