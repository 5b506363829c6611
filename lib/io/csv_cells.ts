/**
 * The cells of a CSV row as text: quoted cells split RFC 4180 style, the
 * header row's `name [unit]` cells and their checks, and a cell of the rows
 * pass 1 keeps (for the time axis and the decimal mark), and a given
 * delimiter that leaves the header one column.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { type CsvDelimiter, DELIMITER_NAMES, detectDelimiter } from "./csv_dialect.ts";
import type { DecimalMark } from "./numbers.ts";

/** The name and unit parsed from a header cell. */
export interface HeaderCell {
  /** Channel name. */
  readonly name: string;
  /** Unit from the brackets, "" when there are none. */
  readonly unit: string;
}

/**
 * Splits `name [unit]` into its parts.
 *
 * @example
 * ```ts
 * import { parseHeaderCell } from "./csv_cells.ts";
 * const h = parseHeaderCell(" seat_rail_z [m/s^2] ");
 * if (h.name !== "seat_rail_z" || h.unit !== "m/s^2") throw new Error();
 * const b = parseHeaderCell("a[1 [m/s^2]");
 * if (b.name !== "a[1" || b.unit !== "m/s^2") throw new Error();
 * ```
 */
export function parseHeaderCell(cell: string): HeaderCell {
  const text = unquote(cell);
  // The unit is the last bracketed group at the end: a `[` before it belongs to the name.
  const match = /^(.*?)\s*\[([^[\]]*)\]$/.exec(text);
  if (match === null) return { name: text, unit: "" };
  return { name: match[1].trim(), unit: match[2].trim() };
}

/** Trims a cell and removes quotes around it (also after whitespace, as exports write). */
function unquote(cell: string): string {
  const text = cell.trim();
  if (text.length >= 2 && text.startsWith('"') && text.endsWith('"')) {
    return text.slice(1, -1).replaceAll('""', '"').trim();
  }
  return text;
}

/**
 * Splits one row (which may hold quoted cells) into raw cells, RFC 4180 style.
 *
 * @example
 * ```ts
 * import { splitQuoted } from "./csv_cells.ts";
 * if (splitQuoted('1,"a,""b""",3', ",").join("|") !== '1|a,"b"|3') throw new Error();
 * ```
 */
export function splitQuoted(row: string, delimiter: string): string[] {
  const cells: string[] = [];
  let cell = "";
  let inQuote = false;
  for (let i = 0; i < row.length; i++) {
    const c = row[i];
    if (inQuote) {
      if (c === '"') {
        if (row[i + 1] === '"') {
          cell += '"';
          i++;
        } else inQuote = false;
      } else cell += c;
    } else if (c === '"' && cell.trim() === "") {
      cell = "";
      inQuote = true;
    } else if (c === delimiter) {
      cells.push(cell);
      cell = "";
    } else cell += c;
  }
  cells.push(cell);
  return cells;
}

/**
 * Splits a header row into cells (respecting quotes) and checks the names.
 *
 * @throws {QuiverError} for an empty or repeated name.
 *
 * @example
 * ```ts
 * import { parseHeaderRow } from "./csv_cells.ts";
 * const h = parseHeaderRow("time_s;a [g]", ";", 1);
 * if (h.length !== 2 || h[1].unit !== "g") throw new Error();
 * ```
 */
export function parseHeaderRow(
  headerText: string,
  delimiter: CsvDelimiter,
  line: number,
  file?: string,
): HeaderCell[] {
  const header = splitQuoted(headerText, delimiter).map(parseHeaderCell);
  const seen = new Map<string, number>();
  header.forEach((cell, i) => {
    if (cell.name === "") {
      throw new QuiverError("empty column name in the header", { file, line, column: i + 1 });
    }
    const previous = seen.get(cell.name);
    if (previous !== undefined) {
      throw new QuiverError(
        `duplicate column name "${cell.name}" (also column ${previous + 1})`,
        { file, line, column: i + 1 },
      );
    }
    seen.set(cell.name, i);
  });
  return header;
}

/**
 * The text of cell `column` of a data row (quotes and surrounding whitespace
 * removed), for the rows pass 1 keeps.
 *
 * @example
 * ```ts
 * import { cellOfRow } from "./csv_cells.ts";
 * if (cellOfRow('0.5, "2" ,3', ",", 1) !== "2") throw new Error();
 * ```
 */
export function cellOfRow(row: string, delimiter: CsvDelimiter, column: number): string {
  return unquote(splitQuoted(row, delimiter)[column] ?? "");
}

/**
 * The message for a delimiter that was given (not found) and leaves the
 * header one column although the delimiter the header suggests splits it;
 * undefined when the given delimiter is plausible.
 *
 * @example
 * ```ts
 * import { forcedDelimiterMismatch } from "./csv_cells.ts";
 * const m = forcedDelimiterMismatch("time_s,a [g],b [g]", ";");
 * if (m !== "the file has one column with the delimiter semicolon; its header suggests comma (3 columns): give --delimiter comma, or auto") throw new Error(m);
 * if (forcedDelimiterMismatch("a [g]", ";") !== undefined) throw new Error();
 * ```
 */
export function forcedDelimiterMismatch(
  headerText: string,
  given: CsvDelimiter,
): string | undefined {
  if (splitQuoted(headerText, given).length !== 1) return undefined;
  const suggested = detectDelimiter(headerText);
  const columns = splitQuoted(headerText, suggested).length;
  if (suggested === given || columns < 2) return undefined;
  const name = DELIMITER_NAMES[suggested];
  return `the file has one column with the delimiter ${DELIMITER_NAMES[given]}; ` +
    `its header suggests ${name} (${columns} columns): give --delimiter ${name}, or auto`;
}

/**
 * The decimal mark the first cell of `row` holding `.` or `,` shows, if any.
 *
 * @example
 * ```ts
 * import { markOfRow } from "./csv_cells.ts";
 * if (markOfRow("1;2,5", ";") !== "," || markOfRow("1;2", ";") !== undefined) throw new Error();
 * ```
 */
export function markOfRow(row: string, delimiter: CsvDelimiter): DecimalMark | undefined {
  for (const cell of splitQuoted(row, delimiter)) {
    if (cell.includes(",")) return ",";
    if (cell.includes(".")) return ".";
  }
  return undefined;
}
