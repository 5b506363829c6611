/**
 * A CSV table of numbers held in memory: one header row, then rows of
 * numbers. Used for result tables such as FRFs; the rules are the one CSV
 * reader's (csv_engine.ts), as for recordings.
 *
 * @module
 */
import {
  type CsvDelimiter,
  CsvRowParser,
  CsvScanner,
  type CsvTableOptions,
  type HeaderCell,
  parseHeaderCell,
  parseHeaderRow,
} from "./csv_engine.ts";
import { checkName } from "./names.ts";
import { restoreFormula } from "./table.ts";

export { type CsvDelimiter, type CsvTableOptions, type HeaderCell, parseHeaderCell };

/** A parsed numeric CSV table with the positions needed for messages. */
export interface NumericCsv {
  /** Header cells, one per column. */
  readonly header: readonly HeaderCell[];
  /** Values per column. */
  readonly columns: readonly Float64Array[];
  /** 1-based line of each data row. */
  readonly lines: readonly number[];
  /** 1-based line of the header. */
  readonly headerLine: number;
  /** Most decimals written in each column (Infinity where exponents were used). */
  readonly decimals: readonly number[];
}

/**
 * Parses a header row and numeric data rows. Column names come back as
 * quiver wrote them: the spreadsheet guard of a formula-like name (`'-x`,
 * table.ts) is undone. With `emptyCells`, an empty cell reads as NaN (a
 * value quiver's writer could not give as a finite number); without, it is
 * refused.
 *
 * @throws {QuiverError} for anything that is not a clean number table, or a
 * name holding a control, bidirectional or zero-width character (names.ts).
 *
 * @example
 * ```ts
 * import { parseNumericCsv } from "./csv_table.ts";
 * const t = parseNumericCsv("frequency_hz;re\n1;0,5\n2;0,25\n");
 * if (t.columns[1][1] !== 0.25 || t.header[0].name !== "frequency_hz") throw new Error();
 * ```
 */
export function parseNumericCsv(
  text: string,
  options: CsvTableOptions & { emptyCells?: boolean } = {},
): NumericCsv {
  const bytes = new TextEncoder().encode(text);
  const scanner = new CsvScanner(options);
  scanner.push(bytes);
  const scan = scanner.end();
  const header = parseHeaderRow(scan.headerText, scan.delimiter, scan.headerLine, options.file)
    .map((cell, i) => {
      const where = { file: options.file, line: scan.headerLine, column: i + 1 };
      checkName(cell.name, `column ${i + 1}`, where);
      checkName(cell.unit, `the unit of column ${i + 1}`, where);
      return { name: restoreFormula(cell.name), unit: cell.unit };
    });
  const columns = header.map(() => new Float64Array(scan.rows));
  const lines = new Array<number>(scan.rows);
  const decimals = header.map(() => 0);
  let r = 0;
  const parser = new CsvRowParser(scan, header.length, {
    row(values, line, written) {
      for (let c = 0; c < values.length; c++) {
        columns[c][r] = values[c];
        if (written[c] > decimals[c]) decimals[c] = written[c];
      }
      lines[r++] = line;
    },
  }, {
    ...options,
    decimalsOf: header.map((_, i) => i),
    emptyAsNaN: options.emptyCells ?? false,
  });
  parser.push(bytes);
  parser.end();
  return { header, columns, lines, headerLine: scan.headerLine, decimals };
}
