import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { compareCurves } from "../../lib/compare/comparison.ts";
import type { Curve } from "../../lib/compare/curve_input.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { runQuiver } from "../helpers/cli.ts";

// A single-mode receptance of our invented bracket, closed form:
// H(ω) = A / (ωn² − ω² + 2jζωnω) (Ewins, Modal Testing, 2nd ed., 2.2).
const FN = 60, ZETA = 0.02, A = 5e3;
function receptance(f: number): [number, number] {
  const w = 2 * Math.PI * f, wn = 2 * Math.PI * FN;
  const dr = wn * wn - w * w, di = 2 * ZETA * wn * w;
  const d = dr * dr + di * di;
  return [(A * dr) / d, (-A * di) / d];
}
const FREQS = Array.from({ length: 400 }, (_, k) => 5 + 0.5 * k);

describe("compare puts both curves in one unit, or refuses", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-compare-units-");
    // Test: accelerance = (jω)²·receptance = −ω²·H, as re/im.
    const test = ["frequency_hz,re [(m/s^2)/N],im [(m/s^2)/N]"];
    // Simulation: receptance in mm/N, as magnitude and phase.
    const sim = ["frequency_hz,mag [mm/N],phase_deg"];
    // A pressure FRF, another quantity.
    const pressure = ["frequency_hz,mag [Pa/N]"];
    for (const f of FREQS) {
      const [r, i] = receptance(f);
      const w2 = (2 * Math.PI * f) ** 2;
      test.push(`${f},${-w2 * r},${-w2 * i}`);
      sim.push(`${f},${1000 * Math.hypot(r, i)},${(Math.atan2(i, r) * 180) / Math.PI}`);
      pressure.push(`${f},${Math.hypot(r, i)}`);
    }
    await writeFile(`${dir}/test_acc.csv`, test.join("\n") + "\n");
    await writeFile(`${dir}/sim_rec.csv`, sim.join("\n") + "\n");
    await writeFile(`${dir}/sim_pa.csv`, pressure.join("\n") + "\n");
  });

  test("accelerance test against receptance simulation (in mm/N): converted by jω, 0 dB apart", async () => {
    // The same system in two forms and two prefixes: after conversion the difference is 0 dB
    // and FRAC is 1 (Cauchy–Schwarz equality for identical curves), up to the 6-digit phase.
    const r = runQuiver([
      "compare",
      "test_acc.csv",
      "sim_rec.csv",
      "--out",
      "d.csv",
      "--summary-out",
      "s.json",
    ], dir);
    expect(r.code, r.stderr).toBe(0);
    const summary = JSON.parse(await readFile(`${dir}/s.json`, "utf8"));
    expect(summary.frac).toBeGreaterThan(1 - 1e-9);
    expect(summary.mean_abs_difference_db).toBeLessThan(1e-6);
    const lines = (await readFile(`${dir}/d.csv`, "utf8")).trim().split("\n");
    expect(lines[0]).toBe(
      "frequency_hz,test [(m/s^2)/N],simulation [(m/s^2)/N],difference_db [dB]",
    );
    const meta = JSON.parse(await readFile(`${dir}/d.csv.meta.json`, "utf8"));
    expect(meta.metadata.unit_conversion).toMatch(/\(jω\)\^2/);
  });

  test("a receptance against a pressure FRF is refused with exit 1, naming both units", () => {
    const r = runQuiver(["compare", "test_acc.csv", "sim_pa.csv", "--out", "x.csv"], dir);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/\[\(m\/s\^2\)\/N\].*\[Pa\/N\]/);
  });
});

describe("difference_db is simulation − test, per line and per band", () => {
  const curve = (values: number[], quantity: "power" | "amplitude"): Curve => ({
    frequencies: new Float64Array(values.map((_, k) => 10 + k)),
    magnitude: new Float64Array(values),
    quantity,
    unit: "",
    column: "x",
  });
  // 10 … 409 Hz, 1 Hz apart. Simulation twice the test below 100 Hz, equal above.
  const n = 400;
  const testValues = Array.from({ length: n }, () => 1);
  const simValues = Array.from({ length: n }, (_, k) => (10 + k < 100 ? 2 : 1));

  test("amplitudes: +6.02 dB where the simulation is twice the test, 0 dB where equal", () => {
    // numpy: 20*np.log10(2) = 6.020599913279624
    const r = compareCurves(curve(testValues, "amplitude"), curve(simValues, "amplitude"), {
      bands: 3,
    });
    const d = r.table.columns[3].values;
    assertClose(d[0], 6.020599913279624, { relative: 1e-12, absolute: 0 }, "line at 10 Hz");
    assertClose(d[n - 1], 0, { relative: 0, absolute: 1e-12 }, "line at 409 Hz");
    // IEC 61260-1 one-third octaves: 50 Hz (44.7–56.2 Hz) lies below 100 Hz, 200 Hz
    // (178–224 Hz) above. Energy ratio 4 → 10·lg 4 = 6.02 dB; equal → 0 dB.
    const band = (nominal: number) => r.summary.bands!.find((b) => b.nominal_hz === nominal)!;
    assertClose(band(50).difference_db, 6.020599913279624, { relative: 1e-12, absolute: 0 }, "50");
    assertClose(band(200).difference_db, 0, { relative: 0, absolute: 1e-12 }, "200 Hz band");
    // Band levels: 50 Hz band holds lines 45…56 Hz, 12 lines of |H|² = 1 → 10·lg 12.
    assertClose(band(50).test_db, 10 * Math.log10(12), { relative: 1e-12, absolute: 0 }, "test");
  });

  test("power quantities: +3.01 dB for twice the PSD", () => {
    // numpy: 10*np.log10(2) = 3.010299956639812
    const r = compareCurves(curve(testValues, "power"), curve(simValues, "power"), { bands: 3 });
    assertClose(r.table.columns[3].values[0], 3.010299956639812, {
      relative: 1e-12,
      absolute: 0,
    }, "line");
    const band = r.summary.bands!.find((b) => b.nominal_hz === 50)!;
    assertClose(band.difference_db, 3.010299956639812, { relative: 1e-12, absolute: 0 }, "band");
  });
});

describe("unit names from files are never keys into an object's prototype", () => {
  test('a simulation in "constructor" against a test in m/s^2 is refused as a unit mismatch', () => {
    const curve = (unit: string): Curve => ({
      frequencies: new Float64Array([10, 20, 30]),
      magnitude: new Float64Array([1, 2, 1]),
      quantity: "amplitude",
      unit,
      column: "x",
    });
    // Before, "constructor" found Object's constructor as a motion order and went on.
    expect(() => compareCurves(curve("m/s^2"), curve("constructor"))).toThrow(
      /the test curve is in \[m\/s\^2\]/,
    );
  });
});
