/**
 * Small CSV tables with text cells (mode-shape files, point maps): a header
 * row of `name [unit]` cells and rows of text, quotes as RFC 4180 writes
 * them (`"a,b"`, `""` for a quote), a UTF-8 BOM, CRLF and blank lines
 * accepted. The delimiter is `,`, or `;` or a tab when the header holds one
 * of those and no comma. Numeric recordings and results go through the
 * byte-level reader (csv_engine.ts) instead; these tables are small.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { type HeaderCell, parseHeaderCell } from "./csv_engine.ts";
import { checkName } from "./names.ts";
import { restoreFormula } from "./table.ts";

/** A text table with the line of each row, for messages. */
export interface TextCsv {
  /** Header cells. */
  readonly header: readonly HeaderCell[];
  /** Rows of trimmed cells, as many as the header has. */
  readonly rows: readonly (readonly string[])[];
  /** 1-based file line of each row. */
  readonly lines: readonly number[];
}

/** Splits the text into records of raw cells, honouring quotes; line of each record's start. */
function records(text: string, delimiter: string): { cells: string[]; line: number }[] {
  const out: { cells: string[]; line: number }[] = [];
  let cells: string[] = [];
  let cell = "";
  let quoted = false;
  let line = 1, start = 1;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else {
        if (ch === "\n") line++;
        cell += ch;
      }
    } else if (ch === '"' && cell.trim() === "") {
      quoted = true;
      cell = "";
    } else if (ch === delimiter) {
      cells.push(cell);
      cell = "";
    } else if (ch === "\n" || ch === "\r") {
      if (ch === "\r" && text[i + 1] === "\n") i++;
      cells.push(cell);
      if (cells.length > 1 || cells[0].trim() !== "") out.push({ cells, line: start });
      cells = [];
      cell = "";
      line++;
      start = line;
    } else cell += ch;
  }
  cells.push(cell);
  if (cells.length > 1 || cells[0].trim() !== "") out.push({ cells, line: start });
  return out;
}

/**
 * Parses a text CSV table. Cells and names come back as quiver wrote them:
 * the spreadsheet guard of formula-like text (`'+z`, table.ts) is undone,
 * so a shapes file `modal` wrote reads back with its `+z` directions.
 *
 * @throws {QuiverError} for a table without a header, a row whose cell
 * count differs from the header's (naming file and line), or a name or cell
 * holding a control, bidirectional or zero-width character (names.ts).
 *
 * @example
 * ```ts
 * import { parseTextCsv } from "./csv_text.ts";
 * const t = parseTextCsv('\uFEFFmode,point,direction,value [m]\r\n1,"12",+z,0.5\n');
 * if (t.header[3].unit !== "m" || t.rows[0][2] !== "+z" || t.lines[0] !== 2) throw new Error();
 * if (parseTextCsv("point,direction\n1,'-x\n").rows[0][1] !== "-x") throw new Error();
 * ```
 */
export function parseTextCsv(text: string, options: { file?: string } = {}): TextCsv {
  const body = text.startsWith("\uFEFF") ? text.slice(1) : text;
  const firstLine = body.split(/\r?\n/, 1)[0] ?? "";
  const delimiter = firstLine.includes(",")
    ? ","
    : firstLine.includes(";")
    ? ";"
    : firstLine.includes("\t")
    ? "\t"
    : ",";
  const all = records(body, delimiter);
  if (all.length === 0) throw new QuiverError("the table is empty", { file: options.file });
  const header = all[0].cells.map((text, i) => {
    const cell = parseHeaderCell(text);
    const where = { file: options.file, line: all[0].line, column: i + 1 };
    checkName(cell.name, `column ${i + 1}`, where);
    checkName(cell.unit, `the unit of column ${i + 1}`, where);
    return { name: restoreFormula(cell.name), unit: cell.unit };
  });
  const rows: string[][] = [];
  const lines: number[] = [];
  for (const { cells, line } of all.slice(1)) {
    if (cells.length !== header.length) {
      throw new QuiverError(
        `row has ${cells.length} fields, the header ${header.length}`,
        { file: options.file, line },
      );
    }
    rows.push(cells.map((c, i) => {
      const cell = c.trim();
      checkName(cell, `column ${i + 1}`, { file: options.file, line, column: i + 1 });
      return restoreFormula(cell);
    }));
    lines.push(line);
  }
  return { header, rows, lines };
}
