import { describe, expect, test } from "vitest";
import { parseNumberBytes } from "../../lib/io/csv_engine.ts";
import { uniformGenerator } from "../helpers/random.ts";

const DOT = 46, COMMA = 44;
const encoder = new TextEncoder();
const parse = (text: string, mark = DOT) => {
  const bytes = encoder.encode(text);
  return parseNumberBytes(bytes, 0, bytes.length, mark);
};
const same = (a: number, b: number) => Object.is(a, b);

// The reference is the language itself: ECMAScript Number(string), which rounds correctly
// (ECMA-262, StringToNumber). Every value the byte parser gives must be the same double.
describe("numbers parsed from bytes equal Number(text)", () => {
  test("edge cases: zeros, signs, 17 digits, subnormals, exponents, extremes", () => {
    const cases = [
      "0",
      "-0",
      "+0",
      "0.0",
      "-0.000",
      "0e5",
      "-0e-5",
      "1",
      "-1",
      "+1",
      "1.",
      ".5",
      "-.5",
      "0.1",
      "0.2",
      "0.3",
      "1e22",
      "1e23",
      "9007199254740993",
      "9007199254740992",
      "123456789012345",
      "1234567890123456",
      "12345678901234567",
      "0.1234567890123456789",
      "3.141592653589793",
      "2.718281828459045",
      "1.7976931348623157e308",
      "1.8e308",
      "4.9e-324",
      "5e-324",
      "2.2250738585072014e-308",
      "2.225073858507201e-308",
      "1e-400",
      "123.456e-7",
      "1E3",
      "1e+3",
      "1e-22",
      "1e-23",
      "0.000001",
      "000123.4500",
      "999999999999999",
      "999999999999999.9",
      "0.9999999999999999",
      "-1.5e-10",
      "12.5",
      "4095.99998",
      "0.000244140625",
      "1e21",
      "1e-21",
      "8.589973e9",
    ];
    for (const text of cases) {
      expect(same(parse(text), Number(text)), `${text}: ${parse(text)} vs ${Number(text)}`).toBe(
        true,
      );
    }
  });

  test("a large random corpus of written doubles and short decimals (seeded)", () => {
    const uniform = uniformGenerator(2026);
    let checked = 0;
    for (let i = 0; i < 200_000; i++) {
      const kind = i % 5;
      let text: string;
      if (kind === 0) {
        // Shortest round-trip form of random doubles over many magnitudes.
        text = String((uniform() - 0.5) * 10 ** Math.floor(uniform() * 40 - 20));
      } else if (kind === 1) {
        // Fixed decimals as loggers write them.
        text = ((uniform() - 0.5) * 2000).toFixed(Math.floor(uniform() * 10));
      } else if (kind === 2) {
        // Exponent form with 1–17 significant digits.
        text = ((uniform() - 0.5) * 20).toExponential(Math.floor(uniform() * 17));
      } else if (kind === 3) {
        // Random digit strings with a point somewhere, up to 20 digits.
        const n = 1 + Math.floor(uniform() * 20);
        let digits = "";
        for (let d = 0; d < n; d++) digits += Math.floor(uniform() * 10);
        const at = Math.floor(uniform() * (n + 1));
        text = `${uniform() < 0.5 ? "-" : ""}${digits.slice(0, at)}.${digits.slice(at)}`;
        if (text.endsWith(".") && text.startsWith(".")) text = "0";
      } else {
        // Subnormal and huge ranges.
        text = `${(uniform() * 10).toFixed(6)}e${Math.floor(uniform() * 640 - 330)}`;
      }
      if (text === "." || text === "-.") continue;
      const value = parse(text);
      if (!same(value, Number(text))) {
        expect.fail(`${text}: parsed ${value}, Number() gives ${Number(text)}`);
      }
      checked++;
    }
    expect(checked).toBeGreaterThan(190_000);
  });

  test("decimal comma: the same values", () => {
    for (const text of ["0,5", "-1,25", "1234,5678", "1,5e-3", ",5"]) {
      expect(parse(text, COMMA)).toBe(Number(text.replace(",", ".")));
    }
  });

  test("what the grammar refuses is NaN (the reader then names the cell)", () => {
    for (
      const text of [
        "",
        "+",
        "-",
        ".",
        "e5",
        "1e",
        "1e+",
        "1.2.3",
        "0x1f",
        "1_000",
        "NaN",
        "Infinity",
        "1 2",
        "١",
      ]
    ) {
      expect(Number.isNaN(parse(text)), text).toBe(true);
    }
  });
});
