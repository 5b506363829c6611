import { describe, expect, test } from "vitest";
import { CsvRowParser, CsvScanner } from "../../lib/io/csv_engine.ts";
import { uniformGenerator } from "../helpers/random.ts";

/** Reads `text` with the engine, pushing it in pieces of the given sizes. */
function readIn(text: string, sizes: () => number) {
  const bytes = new TextEncoder().encode(text);
  const pieces: Uint8Array[] = [];
  for (let at = 0; at < bytes.length;) {
    const n = Math.max(1, sizes());
    pieces.push(bytes.slice(at, at + n)); // a fresh, unaligned array each time
    at += n;
  }
  const scanner = new CsvScanner();
  for (const p of pieces) scanner.push(p);
  const scan = scanner.end();
  const rows: { values: number[]; line: number }[] = [];
  const width = scan.headerText.split(scan.delimiter).length;
  const parser = new CsvRowParser(scan, width, {
    row: (values, line) => rows.push({ values: Array.from(values), line }),
  });
  for (const p of pieces) parser.push(p);
  parser.end();
  return { scan, rows };
}

// The reference is the same text pushed whole: splitting bytes at any place (inside a
// number, a CRLF, a quoted cell, a multi-byte character) must not change a value or a line.
describe("the CSV reader gives the same rows however the bytes are split", () => {
  const uniform = uniformGenerator(77);
  const lines = ['\uFEFFtime_s,"a [m/s²]",b [Pa]', ""];
  for (let i = 0; i < 400; i++) {
    const a = ((uniform() - 0.5) * 1e3).toPrecision(1 + Math.floor(uniform() * 16));
    const b = uniform() < 0.1
      ? `"${(uniform() * 10).toFixed(3)}"`
      : (uniform() * 1e-6).toExponential(5);
    lines.push(`${(i / 1000).toFixed(3)}, ${a} ,${b}`);
    if (uniform() < 0.05) lines.push(" , ,");
  }
  const text = lines.join("\r\n") + "\r\n";
  const whole = readIn(text, () => text.length);

  test("the whole text: 400 rows, header on line 1, blank lines skipped", () => {
    expect(whole.scan.rows).toBe(400);
    expect(whole.rows).toHaveLength(400);
    expect(whole.rows[0].line).toBe(3);
  });

  for (
    const [label, sizes] of [
      ["1 byte", () => 1],
      ["2–7 bytes", () => 2 + Math.floor(uniform() * 6)],
      ["random up to 300 bytes", () => 1 + Math.floor(uniform() * 300)],
    ] as const
  ) {
    test(`pieces of ${label}`, () => {
      const split = readIn(text, sizes);
      expect(split.scan).toEqual(whole.scan);
      expect(split.rows).toEqual(whole.rows);
    });
  }
});
