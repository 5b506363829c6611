import { ambiguousSets } from "../helpers/ambiguous_shapes.ts";
import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { bestPairing, macValue } from "../../lib/modal/mac.ts";
import {
  correlateShapes,
  correlationTables,
  type ModeShape,
  parseShapes,
} from "../../lib/modal/shapes.ts";
import { runQuiver } from "../helpers/cli.ts";
import { gaussianNoise } from "../helpers/random.ts";

const real = (...x: number[]) => ({ re: new Float64Array(x), im: new Float64Array(x.length) });

describe("the modal assurance criterion (Allemang & Brown 1982)", () => {
  test("a hand-computed value: (aᵀb)²/((aᵀa)(bᵀb)) for a = (1, 2, 3), b = (1, 0, −1) is 4/28", () => {
    expect(macValue(real(1, 2, 3), real(1, 0, -1))).toBeCloseTo(4 / 28, 15);
  });

  test("1 with itself under any complex scale factor, 0 with an orthogonal shape", () => {
    const re = gaussianNoise(4, 12), im = gaussianNoise(5, 12);
    const a = { re, im };
    // b = (−2.5 + 1.3j)·a
    const b = {
      re: re.map((r, k) => -2.5 * r - 1.3 * im[k]),
      im: re.map((r, k) => 1.3 * r - 2.5 * im[k]),
    };
    expect(macValue(a, b)).toBeCloseTo(1, 12);
    expect(macValue(a, a)).toBeCloseTo(1, 12);
    // Complex orthogonality: aᴴc = 0 for c = j·(a₂, −a₁) on two points ... use real ones:
    expect(macValue(real(1, 1, 0), real(1, -1, 5))).toBe(0);
    // Complex-aware: a and its conjugate are not alike when the phases differ.
    const c = { re: new Float64Array([1, 0]), im: new Float64Array([0, 1]) };
    const conj = { re: new Float64Array([1, 0]), im: new Float64Array([0, -1]) };
    // aᴴb = 1·1 + (−j)·(−j) = 1 − 1 = 0
    expect(macValue(c, conj)).toBe(0);
  });

  test("pairs by greatest total MAC, where a greedy best-per-row would not", () => {
    expect(bestPairing([[0.9, 0.8], [0.85, 0.1]])).toEqual([[0, 1], [1, 0]]);
    // More simulation modes than test modes: every test mode gets its own.
    expect(bestPairing([[0.1, 0.95, 0.9], [0.2, 0.92, 0.3]])).toEqual([[0, 2], [1, 1]]);
  });
});

/** Three shapes of a 6-point beam (our own): sin(kπx/L) at x = 1…6 of L = 7. */
function beamShapes(order: readonly number[], signs: readonly number[], noise = 0) {
  const w = gaussianNoise(9, 64);
  const rows = ["mode,frequency_hz,point,direction,value"];
  order.forEach((k, i) => {
    for (let p = 1; p <= 6; p++) {
      const v = signs[i] * Math.sin((k * Math.PI * p) / 7) + noise * w[i * 6 + p];
      rows.push(`${i + 1},${[38, 104, 203][k - 1] * (noise > 0 ? 1.03 : 1)},P${p},+z,${v}`);
    }
  });
  return rows.join("\n") + "\n";
}

describe("correlating two shape sets", () => {
  test("a simulation set in another order with signs flipped pairs each test mode with its own", () => {
    const test = parseShapes(beamShapes([1, 2, 3], [1, 1, 1]));
    const sim = parseShapes(beamShapes([3, 1, 2], [-1, 1, -1], 0.02));
    const c = correlateShapes(test, sim);
    expect(c.pairs.map((p) => [p.testMode, p.simulationMode])).toEqual([[1, 2], [2, 3], [3, 1]]);
    for (const p of c.pairs) {
      expect(p.mac).toBeGreaterThan(0.98);
      expect(p.shiftPercent).toBeCloseTo(3, 9); // the simulation is 3 % stiffer (our own data)
    }
    // Sine shapes on these points are orthogonal: the auto-MAC is the identity.
    c.autoMac.forEach((row, i) =>
      row.forEach((v, j) => expect(v).toBeCloseTo(i === j ? 1 : 0, 12))
    );
  });

  test("points on one side only are left out and counted; a map renames simulation points", () => {
    const test = parseShapes(
      "mode,point,direction,re,im\n1,1,z,1,0\n1,2,z,2,0\n1,3,z,3,0\n1,9,z,7,0\n",
    );
    const sim = parseShapes(
      "mode,frequency_hz,point,direction,value\n1,50,N1,Z,2\n1,50,N2,Z,4\n1,50,N3,Z,6\n1,50,N4,Z,1\n",
    );
    const map = new Map([["N1 Z", "1 z"], ["N2 Z", "2 z"], ["N3 Z", "3 z"]]);
    const c = correlateShapes(test, sim, { map });
    expect(c.dofs).toEqual(["1 z", "2 z", "3 z"]);
    expect(c.testOnly).toEqual(["9 z"]);
    expect(c.simulationOnly).toEqual(["N4 Z"]);
    expect(c.pairs[0].mac).toBeCloseTo(1, 12);
    expect(() => correlateShapes(test, sim)).toThrow(/share 0 degree\(s\) of freedom/);
  });
});

describe("quiver mac", () => {
  test("writes the MAC matrix with its sidecar and the pairs; a bad shapes file exits 1", async () => {
    const dir = await mkdtemp("/tmp/quiver-mac-");
    await writeFile(`${dir}/test.csv`, beamShapes([1, 2, 3], [1, 1, 1]));
    await writeFile(`${dir}/sim.csv`, beamShapes([2, 3, 1], [1, -1, 1], 0.02));
    const r = runQuiver([
      "mac",
      `${dir}/test.csv`,
      `${dir}/sim.csv`,
      "--out",
      `${dir}/mac.csv`,
      "--pairs-out",
      `${dir}/pairs.csv`,
    ]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/3 test and 3 simulation mode\(s\) over 6 degree\(s\) of freedom/);
    const pairs = (await readFile(`${dir}/pairs.csv`, "utf8")).trim().split("\n");
    expect(pairs[0]).toBe(
      "test_mode,simulation_mode,test_hz [Hz],simulation_hz [Hz],shift_percent [%],mac,ambiguous,rival_simulation_mode,rival_test_mode,rival_mac",
    );
    // Sine shapes are orthogonal: no pair has a rival.
    expect(pairs.slice(1).map((l) => l.split(",")[6])).toEqual(["0", "0", "0"]);
    expect(r.stderr).not.toMatch(/ambiguous/);
    expect(pairs.slice(1).map((l) => l.split(",").slice(0, 2).join(","))).toEqual([
      "1,3",
      "2,1",
      "3,2",
    ]);
    const meta = JSON.parse(await readFile(`${dir}/mac.csv.meta.json`, "utf8"));
    expect(meta.metadata.dofs_used).toBe(6);
    expect(meta.metadata.auto_mac).toHaveLength(3);
    await writeFile(`${dir}/bad.csv`, "mode,point,direction,value\n1,1,z,abc\n");
    const bad = runQuiver(["mac", `${dir}/bad.csv`, `${dir}/sim.csv`]);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/bad\.csv:2: value "abc" is not a number/);
  });
});

describe("ambiguous pairs (rule ours: a rival of MAC ≥ 0.5 within 0.05 of the pair's)", () => {
  test("a test mode matching two simulation modes at 0.954 and 0.940 is flagged with its rival", () => {
    const { test, simulation } = ambiguousSets(0.94);
    const c = correlateShapes(test, simulation);
    expect(c.mac[0][0]).toBeCloseTo(0.954, 12);
    expect(c.mac[0][1]).toBeCloseTo(0.94, 12);
    // A best-per-row rule (and the assignment) pairs test 1 with simulation 1 and says no more.
    expect(c.pairs.map((p) => [p.testMode, p.simulationMode])).toEqual([[1, 1], [2, 3]]);
    expect(c.pairs[0].rival?.side).toBe("simulation");
    expect(c.pairs[0].rival?.mode).toBe(2);
    expect(c.pairs[0].rival?.mac).toBeCloseTo(0.94, 12);
    // Test mode 2 ↔ simulation 3 (MAC 1/1.01) has no rival.
    expect(c.pairs[1].rival).toBeUndefined();
    const { pairs } = correlationTables(c, test, simulation);
    const column = (name: string) => pairs.columns.find((x) => x.name === name)!.values;
    expect(Array.from(column("ambiguous") as Float64Array)).toEqual([1, 0]);
    expect((column("rival_simulation_mode") as Float64Array)[0]).toBe(2);
    expect(pairs.metadata.pairs.map((p) => p.ambiguous))
      .toEqual([true, false]);
  });

  test("a rival 0.054 below is not flagged; nor are two poor matches below 0.5", () => {
    const apart = correlateShapes(...setsOf(ambiguousSets(0.9)));
    expect(apart.pairs[0].rival).toBeUndefined();
    const poor = correlateShapes(...setsOf(ambiguousSets(0.44, 0.45)));
    expect(poor.pairs[0].simulationMode).toBe(1);
    expect(poor.pairs[0].rival).toBeUndefined();
  });

  test("the other way round: two test modes matching one simulation mode", () => {
    // Swap the roles: the simulation set is the test set and the other way round.
    const { test, simulation } = ambiguousSets(0.94);
    const c = correlateShapes(simulation, test);
    const pair = c.pairs.find((p) => p.simulationMode === 1)!;
    expect(pair.testMode).toBe(1);
    expect(pair.rival).toEqual({ side: "test", mode: 2, mac: expect.closeTo(0.94, 12) });
  });

  test("quiver mac flags the pair in the pairs file and warns of it", async () => {
    const dir = await mkdtemp("/tmp/quiver-mac-ambiguous-");
    const { test, simulation } = ambiguousSets(0.94);
    const csv = (set: typeof test) =>
      "mode,frequency_hz,point,direction,value\n" + set.flatMap((m) =>
        [...m.values.entries()].map(([k, v]) =>
          `${m.mode},${m.frequencyHz},${k.split(" ")[0]},${k.split(" ")[1]},${v.re}`
        )
      ).join("\n") + "\n";
    await writeFile(`${dir}/test.csv`, csv(test));
    await writeFile(`${dir}/sim.csv`, csv(simulation));
    const r = runQuiver([
      "mac",
      `${dir}/test.csv`,
      `${dir}/sim.csv`,
      "--out",
      `${dir}/mac.csv`,
      "--pairs-out",
      `${dir}/pairs.csv`,
    ]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(
      /test 1 ↔ simulation 1: MAC 0\.954.*\[ambiguous: simulation mode 2 has MAC 0\.940\]/,
    );
    expect(r.stderr).toMatch(/warning: the pair test 1 ↔ simulation 1 \(MAC 0\.954\) is ambiguous/);
    const lines = (await readFile(`${dir}/pairs.csv`, "utf8")).trim().split("\n");
    expect(lines[0]).toBe(
      "test_mode,simulation_mode,test_hz [Hz],simulation_hz [Hz],shift_percent [%],mac,ambiguous,rival_simulation_mode,rival_test_mode,rival_mac",
    );
    expect(lines[1].split(",").slice(6, 8)).toEqual(["1", "2"]);
    expect(lines[2].split(",")[6]).toBe("0");
  });
});

function setsOf(s: ReturnType<typeof ambiguousSets>): [ModeShape[], ModeShape[]] {
  return [s.test, s.simulation];
}
