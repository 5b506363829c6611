import { mkdtemp, readFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { frac } from "../../lib/compare/frac.ts";
import { checkCurve, checkValue } from "../../lib/compare/targets.ts";
import type { Curve } from "../../lib/compare/curve_input.ts";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";
import { gaussianNoise } from "../helpers/random.ts";

const curve = (re: Float64Array, im: Float64Array): Curve => ({
  frequencies: re.map((_, k) => k + 1),
  re,
  im,
  magnitude: re.map((r, k) => Math.hypot(r, im[k])),
  quantity: "amplitude",
  unit: "",
  column: "x",
});

describe("FRAC", () => {
  test("is 1 for identical curves (and for a scaled copy) and 0 for orthogonal ones", () => {
    // Definition (Heylen & Lammens 1996): Cauchy–Schwarz bounds it by 1, with equality for proportional curves.
    const a = curve(gaussianNoise(1, 200), gaussianNoise(2, 200));
    expect(frac(a, a).value).toBeCloseTo(1, 12);
    expect(frac(a, curve(a.re!.map((v) => 3 * v), a.im!.map((v) => 3 * v))).value).toBeCloseTo(
      1,
      12,
    );
    const e1 = curve(new Float64Array([1, 0, 0]), new Float64Array(3));
    const e2 = curve(new Float64Array([0, 1, 0]), new Float64Array(3));
    expect(frac(e1, e2).value).toBe(0);
  });

  test("compare: FRAC equals the independent numpy evaluation and both peak shifts read −3 %", async () => {
    // Reference: fixtures/reference/compare_reference.json (tests/reference/make_compare_reference.py).
    const ref = readJsonFixture<{ frac: number; expected_shift_percent: number }>(
      "reference/compare_reference.json",
    );
    const dir = await mkdtemp("/tmp/quiver-compare-");
    const r = runQuiver([
      "compare",
      fixturePath("recordings/bracket_test_frf.csv"),
      fixturePath("recordings/bracket_sim_frf.csv"),
      "--bands",
      "3",
      "--out",
      `${dir}/diff.csv`,
      "--summary-out",
      `${dir}/summary.json`,
    ]);
    expect(r.code).toBe(0);
    const summary = JSON.parse(await readFile(`${dir}/summary.json`, "utf8"));
    expect(summary.frac_on).toBe("complex");
    expect(Math.abs(summary.frac - ref.frac)).toBeLessThan(0.02);
    expect(Math.abs(summary.frac - ref.frac)).toBeLessThan(1e-9); // the same arithmetic, in fact
    expect(summary.peaks.length).toBeGreaterThanOrEqual(2);
    for (const p of summary.peaks) {
      expect(Math.abs(p.shift_percent - ref.expected_shift_percent)).toBeLessThan(0.5);
    }
    expect(summary.grid.from).toBe("test");
    expect(summary.bands.length).toBeGreaterThan(5);
    const csv = (await readFile(`${dir}/diff.csv`, "utf8")).split("\n");
    expect(csv[0]).toBe("frequency_hz,test [m/N],simulation [m/N],difference_db [dB]");
  });
});

describe("targets", () => {
  test("a minimum and a maximum value report pass or fail with the margin", () => {
    expect(checkValue({
      id: "m",
      description: "first mode",
      value: 36.5,
      kind: "min",
      limit: 38,
      unit: "Hz",
    })).toMatchObject({
      pass: false,
      margin: -1.5,
    });
    expect(checkValue({
      id: "l",
      description: "overall",
      value: 68,
      kind: "max",
      limit: 72,
      unit: "dB(A)",
    })).toMatchObject({
      pass: true,
      margin: 4,
    });
  });

  test("a limit curve is interpolated in log-frequency and the worst line reported", () => {
    const f = new Float64Array([100, 316.2278, 1000]);
    const r = checkCurve({
      id: "c",
      description: "cabin",
      frequencies: f,
      levels: new Float64Array([60, 56, 49]),
      kind: "max",
      points: [[100, 60], [1000, 50]],
      unit: "dB",
    });
    // At √(100·1000) ≈ 316 Hz the limit is 55 dB: the curve's 56 dB exceeds it by 1 dB.
    expect(r.pass).toBe(false);
    expect(r.atHz).toBeCloseTo(316.2278, 4);
    expect(r.margin).toBeCloseTo(-1, 4);
  });

  test("every failing band is listed with its margin and nominal label, not only the worst", () => {
    // Bands at 100, 125, 160, 200 Hz (centres of 1/3 octaves, IEC 61260-1 nominal labels), a flat
    // 60 dB limit: levels 61, 59, 63, 60.5 fail at 100 (−1), 160 (−3) and 200 (−0.5).
    const centres = new Float64Array([100, 125.8925, 158.4893, 199.5262]);
    const r = checkCurve({
      id: "c",
      description: "cabin thirds",
      frequencies: centres,
      levels: new Float64Array([61, 59, 63, 60.5]),
      kind: "max",
      points: [[50, 60], [400, 60]],
      unit: "dB(A)",
      nominal: [100, 125, 160, 200],
    });
    expect(r.atNominalHz).toBe(160);
    expect(r.failing!.map((x) => [x.nominalHz, x.margin])).toEqual([
      [100, -1],
      [160, -3],
      [200, -0.5],
    ]);
  });
});
