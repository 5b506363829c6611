/**
 * The one CSV reader of quiver, in one import: bytes in, numbers out, in two
 * passes that each take the file chunk by chunk.
 *
 * - Pass 1 ({@linkcode CsvScanner}, csv_scanner.ts) finds the header, counts
 *   the data rows, notes the first and last data rows (for the time axis),
 *   whether any cell is quoted, and refuses what is not CSV text (NUL bytes,
 *   bytes that are not UTF-8, unbalanced quotes).
 * - Pass 2 ({@linkcode CsvRowParser}, csv_row_parser.ts) splits rows into
 *   cells and turns each cell into a number straight from its bytes, with no
 *   string per cell.
 *
 * A whole file in memory and a file read from disk go through the same two
 * classes (push the bytes, then end), so the rules exist once: delimiter and
 * decimal mark (csv_dialect.ts), a UTF-8 byte-order mark, CRLF, surrounding
 * whitespace, quoted cells (csv_cells.ts) and blank lines. A fault is a
 * QuiverError naming the line and column; faults are reported in
 * file order.
 *
 * @example
 * ```ts
 * import { CsvRowParser, CsvScanner } from "./csv_engine.ts";
 * const bytes = new TextEncoder().encode("a;b\n1;2,5\n");
 * const scanner = new CsvScanner();
 * scanner.push(bytes);
 * const scan = scanner.end();
 * const rows: number[][] = [];
 * const parser = new CsvRowParser(scan, 2, { row: (values) => rows.push([...values]) });
 * parser.push(bytes);
 * parser.end();
 * if (scan.rows !== 1 || rows[0][1] !== 2.5) throw new Error();
 * ```
 *
 * @module
 */
export { type CsvDelimiter, type CsvTableOptions, DELIMITER_NAMES } from "./csv_dialect.ts";
export {
  cellOfRow,
  forcedDelimiterMismatch,
  type HeaderCell,
  markOfRow,
  parseHeaderCell,
  parseHeaderRow,
} from "./csv_cells.ts";
export { type CsvScan, CsvScanner, notUtf8, NotUtf8Error } from "./csv_scanner.ts";
export {
  changedWhileRead,
  CsvRowParser,
  firstDecimalMark,
  parseCellText,
  parseNumberBytes,
  type RowSink,
} from "./csv_row_parser.ts";
