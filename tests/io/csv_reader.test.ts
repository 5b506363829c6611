import { describe, expect, test } from "vitest";
import { parseCsvRecording, parseHeaderCell } from "../../lib/io/csv_reader.ts";
import { formatCsv } from "../../lib/io/table.ts";
import { QuiverError } from "../../lib/errors.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { gaussianNoise } from "../helpers/random.ts";

const clean = "time_s,seat_rail_z [m/s^2],driver_ear [Pa]\n" +
  "0,0.5,1\n0.001,-0.25,2\n0.002,0,3\n0.003,1e-3,4\n";

/** Expects a QuiverError whose location and message match. */
function expectRefusal(
  text: string,
  where: { line?: number; column?: number },
  pattern: RegExp,
  options = {},
): void {
  let error: unknown;
  try {
    parseCsvRecording(text, { file: "r.csv", ...options });
  } catch (e) {
    error = e;
  }
  expect(error).toBeInstanceOf(QuiverError);
  const q = error as QuiverError;
  expect(q.location.file).toBe("r.csv");
  expect(q.location.line).toBe(where.line);
  expect(q.location.column).toBe(where.column);
  expect(q.detail).toMatch(pattern);
}

describe("CSV recordings that are read", () => {
  test("a clean file gives channels with units and the rate from the time column", () => {
    const rec = parseCsvRecording(clean);
    assertClose(rec.rate, 1000, { relative: 1e-12, absolute: 0 });
    expect(rec.channels.map((c) => [c.name, c.unit])).toEqual([
      ["seat_rail_z", "m/s^2"],
      ["driver_ear", "Pa"],
    ]);
    expect(Array.from(rec.channels[0].data)).toEqual([0.5, -0.25, 0, 0.001]);
  });

  test("a BOM, CRLF line ends, quoted headers, whitespace and trailing blank lines are harmless", () => {
    const messy = '\uFEFF"time_s" , "seat_rail_z [m/s^2]", driver_ear [Pa] \r\n' +
      "0, 0.5 ,1\r\n0.001,-0.25,2\r\n0.002,0,3\r\n0.003,1e-3,4\r\n\r\n\r\n";
    const a = parseCsvRecording(clean);
    const b = parseCsvRecording(messy);
    expect(b.channels.map((c) => c.name)).toEqual(a.channels.map((c) => c.name));
    expect(Array.from(b.channels[1].data)).toEqual(Array.from(a.channels[1].data));
  });

  test("semicolon delimiter with decimal comma is detected", () => {
    const rec = parseCsvRecording("time;acc [m/s^2]\n0;1,5\n0,5;-2,25\n1;3\n");
    expect(rec.rate).toBe(2);
    expect(Array.from(rec.channels[0].data)).toEqual([1.5, -2.25, 3]);
  });

  test("semicolon delimiter with decimal point is read too", () => {
    const rec = parseCsvRecording("time;acc\n0;1.5\n0.5;-2.25\n1;3\n");
    expect(Array.from(rec.channels[0].data)).toEqual([1.5, -2.25, 3]);
  });

  test("without a time column the given rate is used", () => {
    const rec = parseCsvRecording("a,b\n1,2\n3,4\n", { rate: 51200 });
    expect(rec.rate).toBe(51200);
    expect(rec.startTime).toBe(0);
  });

  test("a time column and a matching rate agree; the given rate is kept exact", () => {
    const rec = parseCsvRecording(clean, { rate: 1000 });
    expect(rec.rate).toBe(1000);
  });

  test("a time column that starts late sets the start time", () => {
    const rec = parseCsvRecording("time_s,a\n12.5,1\n12.75,2\n13,3\n");
    expect(rec.startTime).toBe(12.5);
    expect(rec.rate).toBe(4);
  });

  test("round trip: a recording written as CSV reads back identically", () => {
    const rate = 25600;
    const x = gaussianNoise(5, 2000);
    const time = x.map((_, i) => i / rate);
    const csv = formatCsv({
      metadata: {},
      columns: [
        { name: "time_s", unit: "", values: time },
        { name: "wheel_hub_x", unit: "m/s^2", values: x },
      ],
    });
    const back = parseCsvRecording(csv);
    expect(Array.from(back.channels[0].data)).toEqual(Array.from(x));
    assertClose(back.rate, rate, { relative: 1e-9, absolute: 0 });
  });

  test("header cells split into name and unit", () => {
    expect(parseHeaderCell("mic [Pa]")).toEqual({ name: "mic", unit: "Pa" });
    expect(parseHeaderCell("force")).toEqual({ name: "force", unit: "" });
  });
});

describe("CSV recordings that are refused, with file, line and column", () => {
  test("empty file", () => expectRefusal("", {}, /empty/));
  test("whitespace only", () => expectRefusal("\n \n", {}, /empty/));
  test("header only", () => expectRefusal("time_s,a\n", { line: 1 }, /no data rows/));
  test("ragged row", () =>
    expectRefusal("time_s,a,b\n0,1,2\n0.1,1\n", { line: 3 }, /2 fields, the header has 3/));
  test("text in a numeric cell", () =>
    expectRefusal(
      "time_s,a\n0,1\n0.1,abc\n0.2,3\n",
      { line: 3, column: 2 },
      /"abc" is not a number/,
    ));
  test("empty cell", () =>
    expectRefusal("time_s,a,b\n0,1,2\n0.1,,2\n0.2,3,3\n", { line: 3, column: 2 }, /empty cell/));
  test("NaN", () =>
    expectRefusal(
      "time_s,a\n0,1\n0.1,NaN\n0.2,1\n",
      { line: 3, column: 2 },
      /not a finite number/,
    ));
  test("Inf", () =>
    expectRefusal(
      "time_s,a\n0,1\n0.1,-Inf\n0.2,1\n",
      { line: 3, column: 2 },
      /not a finite number/,
    ));
  test("number too large for a double", () =>
    expectRefusal("a\n1\n1e999\n", { line: 3, column: 1 }, /beyond the range of a double/, {
      rate: 10,
    }));
  test("duplicate column names", () =>
    expectRefusal("time_s,a [V],a\n0,1,2\n", { line: 1, column: 3 }, /duplicate column name "a"/));
  test("two time columns", () =>
    expectRefusal("time_s,time,a\n0,0,1\n", { line: 1, column: 2 }, /two time columns/));
  test("time in milliseconds", () =>
    expectRefusal("time [ms],a\n0,1\n1,2\n", { line: 1, column: 1 }, /seconds/));
  test("a jump in the time column", () =>
    expectRefusal(
      "time_s,a\n0,1\n0.001,1\n0.002,1\n0.0035,1\n0.0045,1\n0.0055,1\n",
      { line: 5, column: 1 },
      /gap, jump or jitter/,
    ));
  test("a reversal in the time column", () =>
    expectRefusal(
      "time_s,a\n0,1\n0.002,1\n0.001,1\n0.003,1\n",
      { line: 4, column: 1 },
      /backwards/,
    ));
  test("time that never increases", () =>
    expectRefusal("time_s,a\n1,1\n1,1\n", { line: 3, column: 1 }, /does not increase/));
  test("a time column with too little precision for the rate", () => {
    // 25.6 kHz: the interval 39.0625 µs written with 6 decimals steps by 39 or 40 µs.
    const printed = Array.from({ length: 20 }, (_, i) => (i / 25600).toFixed(6));
    const steps = printed.slice(1).map((t, i) => Number(t) - Number(printed[i]));
    const median = steps.slice().sort()[Math.floor(steps.length / 2)];
    const firstOff = steps.findIndex((d) => Math.abs(d - median) > 0.01 * median);
    expect(firstOff).toBeGreaterThan(0);
    const rows = printed.map((t) => `${t},0`);
    expectRefusal(
      `time_s,a\n${rows.join("\n")}\n`,
      { line: firstOff + 3, column: 1 },
      /6 decimals, too few/,
    );
  });
  test("no time column and no rate", () =>
    expectRefusal("a,b\n1,2\n", { line: 1 }, /give the sample rate/));
  test("a rate that contradicts the time column", () =>
    expectRefusal(clean, {}, /rate of .* Hz, but 2000 Hz was given/, { rate: 2000 }));
  test("mixed decimal marks", () =>
    expectRefusal(
      "time;a\n0;1,5\n1;2.5\n2;1\n",
      { line: 3, column: 2 },
      /uses "\." as decimal mark/,
    ));
  test("binary garbage", () => expectRefusal("\u0000\u0001\u0002binary", {}, /binary/));
  test("only blank cells (found by the property tests)", () =>
    expectRefusal(",\n", {}, /no header row/));
  test("an empty column name", () =>
    expectRefusal("time_s,,b\n0,1,2\n", { line: 1, column: 2 }, /empty column name/));
});
