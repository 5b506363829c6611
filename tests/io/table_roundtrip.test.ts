import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { parseHeaderCell } from "../../lib/io/csv_engine.ts";
import { parseNumericCsv } from "../../lib/io/csv_table.ts";
import { parseTextCsv } from "../../lib/io/csv_table.ts";
import { readResultFile } from "../../lib/io/result_file.ts";
import {
  type ColumnValues,
  formatCsv,
  formatJson,
  noteEmptyCells,
  type Table,
  type TableMetadata,
} from "../../lib/io/table.ts";
import { writeCsvPair } from "../../lib/io/table_file.ts";

// The characters that start a formula in a spreadsheet: =, +, -, @, tab, CR
// (OWASP, "CSV Injection", https://owasp.org/www-community/attacks/CSV_Injection).
const FORMULA_LIKE = ["+z", "-x", "=a", "@b", '=HYPERLINK("x")', "'+z", "''-x", "'plain"];

describe("tables quiver writes read back through quiver to the same text and values", () => {
  test("formula-like text cells are guarded in the CSV and restored when read", () => {
    const values = new Float64Array(10).map((_, i) => 1.5 - 1.5 * i);
    const table: Table<TableMetadata, ColumnValues> = {
      metadata: {},
      columns: [
        { name: "direction", unit: "", values: [...FORMULA_LIKE, "z", "don't"] },
        { name: "value", unit: "m", values },
      ],
    };
    const csv = formatCsv(table);
    const lines = csv.split("\n");
    // Guarded as text: a leading ' on everything that starts (after any 's) with = + - @.
    expect(lines[1]).toBe("'+z,1.5");
    expect(lines[2]).toBe("'-x,0");
    expect(lines[3]).toBe("'=a,-1.5"); // the number -1.5 is not text: no guard
    expect(lines[4]).toBe("'@b,-3");
    expect(lines[6]).toBe("''+z,-6");
    expect(lines[7]).toBe("'''-x,-7.5");
    expect(lines[8]).toBe("'plain,-9"); // a ' before plain text is not a guard
    const back = parseTextCsv(csv);
    expect(back.rows.map((r) => r[0])).toEqual([...FORMULA_LIKE, "z", "don't"]);
    expect(back.rows.map((r) => Number(r[1]))).toEqual(Array.from(values));
  });

  test("formula-like column names come back as written, in text and numeric tables", () => {
    const table: Table = {
      metadata: {},
      columns: [
        { name: "frequency_hz", unit: "", values: new Float64Array([0, 1]) },
        { name: "-x", unit: "m/s^2", values: new Float64Array([-1.5, 2]) },
        { name: "=SUM(A1)", unit: "", values: new Float64Array([3, -4]) },
        { name: "a[1]", unit: "", values: new Float64Array([5, 6]) },
        { name: "b[2]", unit: "Pa", values: new Float64Array([7, 8]) },
      ],
    };
    const csv = formatCsv(table);
    expect(csv.split("\n")[0]).toBe("frequency_hz,'-x [m/s^2],'=SUM(A1),a[1] [],b[2] [Pa]");
    const expected = table.columns.map((c) => ({ name: c.name, unit: c.unit }));
    const numeric = parseNumericCsv(csv);
    expect(numeric.header).toEqual(expected);
    expect(numeric.columns[1]).toEqual(new Float64Array([-1.5, 2]));
    expect(parseTextCsv(csv).header).toEqual(expected);
  });

  test("the unit is the last bracketed group at the end of a header cell", () => {
    expect(parseHeaderCell("a[1] [m/s^2]")).toEqual({ name: "a[1]", unit: "m/s^2" });
    expect(parseHeaderCell("a[1] []")).toEqual({ name: "a[1]", unit: "" });
    expect(parseHeaderCell("seat [x] rail")).toEqual({ name: "seat [x] rail", unit: "" });
    expect(parseHeaderCell("a[1 [V]")).toEqual({ name: "a[1", unit: "V" });
    expect(parseHeaderCell("acc[31m [V]")).toEqual({ name: "acc[31m", unit: "V" });
  });

  test("a CSV+sidecar pair with formula-like names reads back with its metadata", async () => {
    const dir = await mkdtemp("/tmp/quiver-roundtrip-");
    const table: Table = {
      metadata: { analysis: "spectrum" },
      columns: [
        { name: "frequency_hz", unit: "", values: new Float64Array([0, 1]) },
        { name: "+y", unit: "V", values: new Float64Array([1, 2]) },
      ],
    };
    await writeCsvPair(`${dir}/t.csv`, formatCsv(table), table.columns, table.metadata);
    const back = await readResultFile(`${dir}/t.csv`);
    expect(back.metadata?.analysis).toBe("spectrum");
    expect(back.columns[1].name).toBe("+y");
    expect(back.columns[1].values).toEqual(new Float64Array([1, 2]));
  });
});

describe("values that are not finite: empty cells with their reason, never NaN/Infinity text", () => {
  const table = (): Table => ({
    metadata: { analysis: "bands" },
    columns: [
      { name: "frequency_hz", unit: "", values: new Float64Array([0, 1, 2]) },
      { name: "level", unit: "dB", values: new Float64Array([-Infinity, 3, -Infinity]) },
      { name: "ratio", unit: "", values: new Float64Array([NaN, 1, 2]) },
      { name: "big", unit: "", values: new Float64Array([1, Infinity, 2]) },
    ],
  });

  test("CSV cells are empty, JSON values null, and the metadata says which and why", () => {
    const noted = noteEmptyCells(table());
    const csv = formatCsv(noted);
    expect(csv).not.toMatch(/NaN|Infinity/);
    expect(csv.split("\n")[1]).toBe("0,,,1");
    const json = JSON.parse(formatJson(noted));
    expect(json.columns[1].values).toEqual([null, 3, null]);
    expect(noted.metadata.empty_cells).toEqual([
      {
        column: "level",
        count: 2,
        first_row: 0,
        reason: expect.stringMatching(/dB \(logarithm\) of zero/),
      },
      { column: "ratio", count: 1, first_row: 0, reason: expect.stringMatching(/^NaN/) },
      { column: "big", count: 1, first_row: 1, reason: expect.stringMatching(/IEEE 754 overflow/) },
    ]);
    // A table with only finite values is left as it was.
    const finite = table();
    const clean = { ...finite, columns: finite.columns.slice(0, 1) };
    expect(noteEmptyCells(clean)).toBe(clean);
  });

  test("the readers take the empty cells (CSV) and nulls (JSON) back as NaN", async () => {
    const dir = await mkdtemp("/tmp/quiver-empty-");
    const noted = noteEmptyCells(table());
    await writeCsvPair(`${dir}/t.csv`, formatCsv(noted), noted.columns, noted.metadata);
    await writeFile(`${dir}/t.json`, formatJson(noted));
    for (const file of ["t.csv", "t.json"]) {
      const back = await readResultFile(`${dir}/${file}`);
      const level = back.columns[1].values as Float64Array;
      expect(Number.isNaN(level[0]) && level[1] === 3 && Number.isNaN(level[2]), file).toBe(true);
      expect(back.columns[3].values[0], file).toBe(1);
      expect(Number.isNaN(back.columns[3].values[1]), file).toBe(true);
    }
  });

  test("an empty cell in a column the sidecar does not declare is refused", async () => {
    const dir = await mkdtemp("/tmp/quiver-empty-");
    const noted = noteEmptyCells(table());
    // The frequency of the last row emptied: frequency_hz is not among the declared columns.
    const csv = formatCsv(noted).replace("\n2,,2,2\n", "\n,,2,2\n");
    await writeCsvPair(`${dir}/t.csv`, csv, noted.columns, noted.metadata);
    await expect(readResultFile(`${dir}/t.csv`)).rejects.toThrow(
      /t\.csv:4:1: empty cell where a number was expected/,
    );
    // A plain CSV (no sidecar) is read as strictly as before.
    await writeFile(`${dir}/plain.csv`, "frequency_hz,a\n0,\n1,2\n");
    await expect(readResultFile(`${dir}/plain.csv`)).rejects.toThrow(/plain\.csv:2:2: empty cell/);
    expect(await readFile(`${dir}/t.csv`, "utf8")).toContain("\n,,2,2\n");
  });
});

describe("names from files: control, bidi and zero-width characters are refused, shown escaped", () => {
  const cases: [string, string, string][] = [
    ["ESC", "acc\u001b[31m", "acc\\u001b[31m"],
    ["BEL", "acc\u0007", "acc\\u0007"],
    ["right-to-left override", "mic\u202eR", "mic\\u202eR"],
    ["zero-width space", "mic\u200b", "mic\\u200b"],
    ["C1 CSI", "mic\u009b2J", "mic\\u009b2J"],
  ];
  for (const [what, name, shown] of cases) {
    test(what, () => {
      const escaped = shown.replace(/[\\[\]]/g, "\\$&");
      expect(() => parseNumericCsv(`frequency_hz,${name} [V]\n0,1\n`, { file: "t.csv" }))
        .toThrow(new RegExp(`t\\.csv:1:2: column 2: the name "${escaped}" holds a control`));
      expect(() => parseTextCsv(`point,direction\n1,${name}\n`, { file: "p.csv" }))
        .toThrow(new RegExp(`p\\.csv:2:2: column 2: the name "${escaped}"`));
    });
  }

  test("ordinary names, also with brackets and non-Latin letters, pass", () => {
    const t = parseNumericCsv("frequency_hz,a[1] [m/s^2],Mikrofon_Ohr_links,座席 [Pa]\n0,1,2,3\n");
    expect(t.header.map((h) => h.name)).toEqual([
      "frequency_hz",
      "a[1]",
      "Mikrofon_Ohr_links",
      "座席",
    ]);
  });
});
