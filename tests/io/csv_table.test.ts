import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { parseNumericCsv, parseTextCsv } from "../../lib/io/csv_table.ts";
import { readFrfFile } from "../../lib/modal/frf_input.ts";
import { readCurveFile } from "../../lib/compare/curve_input.ts";
import { parseShapes } from "../../lib/modal/shapes.ts";

// Small tables as other programs export them, read to values written by hand.
describe("small CSV tables through papaparse", () => {
  test("a ;-delimited export with decimal commas", () => {
    const t = parseNumericCsv("frequency_hz;re [m/N];im [m/N]\n10;0,5;-1,25\n20,5;1,5e-3;0\n");
    expect(t.header.map((h) => h.name)).toEqual(["frequency_hz", "re", "im"]);
    expect(Array.from(t.columns[0])).toEqual([10, 20.5]);
    expect(Array.from(t.columns[1])).toEqual([0.5, 0.0015]);
    expect(Array.from(t.columns[2])).toEqual([-1.25, 0]);
    expect(t.lines).toEqual([2, 3]);
  });

  test("a comma-delimited table keeps . as its decimal mark: 1,5 is two cells", () => {
    expect(() => parseNumericCsv("a,b\n1,5\n2,5,0\n", { file: "c.csv" }))
      .toThrow(/c\.csv:3: row has 3 fields, the header has 2/);
  });

  test("a quoted header cell with a comma inside", () => {
    const t = parseNumericCsv('frequency_hz,"seat, left [m/s^2]"\n1,0.25\n2,0.5\n');
    expect(t.header[1]).toEqual({ name: "seat, left", unit: "m/s^2" });
    expect(Array.from(t.columns[1])).toEqual([0.25, 0.5]);
  });

  test("a byte-order mark and CRLF line ends", () => {
    const t = parseNumericCsv("\uFEFFfrequency_hz,mag [m/N]\r\n1,2.5\r\n\r\n3,4\r\n", {
      file: "b.csv",
    });
    expect(t.header[0].name).toBe("frequency_hz");
    expect(Array.from(t.columns[0])).toEqual([1, 3]);
    expect(Array.from(t.columns[1])).toEqual([2.5, 4]);
    expect(t.lines).toEqual([2, 4]);
  });

  test("a missing cell is refused, naming file, line and column, never read as 0", () => {
    expect(() => parseNumericCsv("a;b\n1;2\n3;\n", { file: "m.csv" }))
      .toThrow(/m\.csv:3:2: empty cell where a number was expected/);
    expect(() => parseNumericCsv("a,b\n1,2\n3\n", { file: "m.csv" }))
      .toThrow(/m\.csv:3: row has 1 fields, the header has 2/);
  });

  test("lines count the line breaks inside quoted cells", () => {
    expect(() => parseNumericCsv('a,b\n"1",2\n3,"x\ny"\n4,z\n', { file: "q.csv" }))
      .toThrow(/q\.csv:3:2: "x\ny" is not a number/);
    expect(() => parseNumericCsv('a,b\n"1\n",2\n3,x\n', { file: "q.csv" }))
      .toThrow(/q\.csv:4:2: "x" is not a number/);
  });

  test("an unbalanced quote is refused at the line where it opens", () => {
    expect(() => parseNumericCsv('a,b\n1,2\n3,"4\n5,6\n', { file: "u.csv" }))
      .toThrow(/u\.csv:3: unbalanced quotes/);
  });

  test("a text table: ; with a BOM, CRLF and a quoted cell holding the delimiter", () => {
    const t = parseTextCsv('\uFEFFpoint;direction;note\r\n12;+z;"a;b"\r\n13;-x;c\r\n');
    expect(t.rows).toEqual([["12", "+z", "a;b"], ["13", "-x", "c"]]);
    expect(t.lines).toEqual([2, 3]);
  });

  test("a shapes export with ; and decimal commas is read by its numbers", () => {
    const s = parseShapes("mode;frequency_hz;point;direction;value\n1;44,5;N1;z;0,25\n");
    expect(s[0].frequencyHz).toBe(44.5);
    expect(s[0].values.get("N1 z")).toEqual({ re: 0.25, im: 0 });
    // With the comma as delimiter a quoted "0,25" is not a number.
    expect(() => parseShapes('mode,point,direction,value\n1,N1,z,"0,25"\n', { file: "s.csv" }))
      .toThrow(/s\.csv:2: value "0,25" is not a number/);
  });
});

describe("files read through the small-table reader and the column convention", () => {
  test("an FRF export with ;, decimal commas, a BOM and CRLF", async () => {
    const dir = await mkdtemp("/tmp/quiver-csv-table-");
    const path = `${dir}/solver.csv`;
    await writeFile(
      path,
      "\uFEFFfrequency_hz;a_re [m/N];a_im [m/N]\r\n1;0,5;0\r\n2;0;-2\r\n",
    );
    const data = await readFrfFile(path);
    expect(data.channels.map((c) => c.name)).toEqual(["a"]);
    expect(Array.from(data.frequencies)).toEqual([1, 2]);
    expect(Array.from(data.channels[0].magnitude)).toEqual([0.5, 2]);
    expect(data.channels[0].form).toBe("receptance");
  });

  test("an FRF magnitude column in dB is read as levels, 20·log10", async () => {
    const dir = await mkdtemp("/tmp/quiver-csv-table-");
    await writeFile(`${dir}/db.csv`, "frequency_hz,mag [dB]\n1,20\n2,-20\n");
    const data = await readFrfFile(`${dir}/db.csv`);
    expect(Array.from(data.channels[0].magnitude)).toEqual([10, 0.1]);
  });

  test("compare and modal read mag_db with phase_deg the same: complex", async () => {
    const dir = await mkdtemp("/tmp/quiver-csv-table-");
    await writeFile(`${dir}/p.csv`, "frequency_hz,mag_db,phase_deg\n1,20,90\n2,0,180\n");
    const curve = await readCurveFile(`${dir}/p.csv`);
    const frf = await readFrfFile(`${dir}/p.csv`);
    // 20 dB → 10, 0 dB → 1; 90° and 180°.
    expect(curve.im?.[0]).toBeCloseTo(10, 12);
    expect(curve.re?.[1]).toBeCloseTo(-1, 12);
    expect(frf.channels[0].im?.[0]).toBeCloseTo(10, 12);
    expect(frf.channels[0].re?.[1]).toBeCloseTo(-1, 12);
  });

  test("a real part without its imaginary part is refused by both", async () => {
    const dir = await mkdtemp("/tmp/quiver-csv-table-");
    await writeFile(`${dir}/half.csv`, "frequency_hz,a_re,b\n1,2,3\n2,3,4\n");
    const message = /half\.csv: FRF "a" has only one of its real and imaginary columns/;
    await expect(readFrfFile(`${dir}/half.csv`)).rejects.toThrow(message);
    await expect(readCurveFile(`${dir}/half.csv`)).rejects.toThrow(message);
  });
});
