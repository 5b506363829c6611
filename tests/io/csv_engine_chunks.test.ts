import { describe, expect, test } from "vitest";
import { CsvRowParser, CsvScanner } from "../../lib/io/csv_engine.ts";
import { uniformGenerator } from "../helpers/random.ts";

/**
 * Reads `text` with the engine, pushing it in pieces of the given sizes;
 * with `offsets`, each piece is a view starting that many bytes into a
 * larger buffer, as a reader's subarrays are (the word-wise scans must then
 * handle an unaligned start and end); with `reuse`, every piece is pushed
 * from one buffer overwritten by the next, as the file reader does, so the
 * engine must copy whatever it keeps.
 */
function readIn(text: string, sizes: () => number, offsets?: () => number, reuse = false) {
  const bytes = new TextEncoder().encode(text);
  const pieces: Uint8Array[] = [];
  for (let at = 0; at < bytes.length;) {
    const n = Math.max(1, sizes());
    const piece = bytes.slice(at, at + n); // a fresh array each time
    if (offsets === undefined) pieces.push(piece);
    else {
      const offset = offsets();
      const host = new Uint8Array(offset + piece.length + 3);
      host.set(piece, offset);
      pieces.push(host.subarray(offset, offset + piece.length));
    }
    at += n;
  }
  const shared = new Uint8Array(Math.max(...pieces.map((p) => p.length)));
  const feed = (push: (bytes: Uint8Array) => void) => {
    for (const p of pieces) {
      if (!reuse) push(p);
      else {
        shared.set(p);
        push(shared.subarray(0, p.length));
        shared.fill(0x3f); // what the next read would leave there
      }
    }
  };
  const scanner = new CsvScanner();
  feed((p) => scanner.push(p));
  const scan = scanner.end();
  const rows: { values: number[]; line: number }[] = [];
  const width = scan.headerText.split(scan.delimiter).length;
  const parser = new CsvRowParser(scan, width, {
    row: (values, line) => rows.push({ values: Array.from(values), line }),
  });
  feed((p) => parser.push(p));
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

// Without quotes the scanner counts rows four bytes at a time and the parser
// takes each clean row in one pass: blank rows (empty, spaces, delimiters
// only), CR LF and LF mixed, and views at every alignment must not change a
// count, a value or a line.
describe("quote-free text: the fast paths agree with a plain line split", () => {
  const uniform = uniformGenerator(78);
  const lines = ["time_s;a [V];b [V]"];
  for (let i = 0; i < 600; i++) {
    const a = ((uniform() - 0.5) * 1e3).toPrecision(1 + Math.floor(uniform() * 17));
    const b = uniform() < 0.2 ? (uniform() * 1e-6).toExponential(5) : "-0.5";
    lines.push(`${i / 1000};${a}; ${b}`);
    const r = uniform();
    if (r < 0.03) lines.push("");
    else if (r < 0.06) lines.push("  ");
    else if (r < 0.09) lines.push(" ; ;");
  }
  const text = lines.map((l) => l + (uniform() < 0.5 ? "\r\n" : "\n")).join("");
  const whole = readIn(text, () => text.length);
  // The expected rows, by splitting the text in the test: lines holding anything but spaces and ";".
  const expectedLines = lines.flatMap((l, i) => i > 0 && /[^ ;]/.test(l) ? [i + 1] : []);

  test("rows, lines and values as a line split gives them", () => {
    expect(whole.scan.rows).toBe(600);
    expect(whole.rows.map((r) => r.line)).toEqual(expectedLines);
    expect(whole.scan.last?.line).toBe(expectedLines[expectedLines.length - 1]);
    whole.rows.forEach((row, r) => {
      const cells = lines[row.line - 1].split(";").map((c) => Number(c.trim()));
      expect(row.values).toEqual(cells);
      expect(row.values[0]).toBe(r / 1000);
    });
  });

  for (
    const [label, sizes] of [
      ["1–9 bytes", () => 1 + Math.floor(uniform() * 9)],
      ["random up to 700 bytes", () => 1 + Math.floor(uniform() * 700)],
    ] as const
  ) {
    test(`pieces of ${label} at every alignment`, () => {
      const split = readIn(text, sizes, () => Math.floor(uniform() * 8));
      expect(split.scan).toEqual(whole.scan);
      expect(split.rows).toEqual(whole.rows);
    });
  }

  test("pieces pushed from one reused buffer, as the file reader pushes them", () => {
    // Pieces shorter than a row: some hold no line end and follow a row's end exactly.
    const split = readIn(text, () => 1 + Math.floor(uniform() * 9), undefined, true);
    expect(split.scan).toEqual(whole.scan);
    expect(split.rows).toEqual(whole.rows);
  });

  test("the row count and the last row, with LF line ends, however the bytes are split", () => {
    const lf = lines.join("\n") + "\n";
    const bytes = new TextEncoder().encode(lf);
    // Reference by a plain line split: the data rows' lines.
    const rowLines = lines.flatMap((l, i) => i > 0 && /[^ ;]/.test(l) ? [i + 1] : []);
    for (const size of [1, 5, 64, 700, bytes.length]) {
      const scanner = new CsvScanner();
      for (let at = 0; at < bytes.length; at += size) {
        scanner.push(bytes.subarray(at, Math.min(bytes.length, at + size)));
      }
      const scan = scanner.end();
      expect(scan.rows, `pieces of ${size}`).toBe(rowLines.length);
      expect(scan.last?.text).toBe(lines[rowLines[rowLines.length - 1] - 1]);
      expect(scan.last?.line).toBe(rowLines[rowLines.length - 1]);
    }
  });
});
