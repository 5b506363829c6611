import { mkdtemp, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { type Mode, simulateReceptance } from "../helpers/modal.ts";
import { gaussianNoise } from "../helpers/random.ts";

// A shaker run of our own arm: one mode at 35.4 Hz (ζ 2 %) under random force, and drift
// in the response below ~1 Hz that the force does not cause (a leaky integrator of white
// noise, corner 0.5 Hz), so |H1| has random peaks of near-zero coherence there (Bendat &
// Piersol, Random Data, eq. 9.57: γ² = Gvv/(Gvv + Gnn)). 256 Hz, block 1024: 0.25 Hz lines.
const MODE: Mode = { frequencyHz: 35.4, damping: 0.02, residue: 1e3 };

describe("damping with noise peaks below the first mode", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-damping-policy-");
    const rate = 256, samples = 16384;
    const force = gaussianNoise(21, samples);
    const y = simulateReceptance([MODE], force, rate);
    const a = Math.exp((-2 * Math.PI * 0.5) / rate);
    let state = 0;
    const drift = gaussianNoise(23, samples).map((v) => (state = a * state + v));
    let sy = 0, sd = 0;
    for (let i = 0; i < samples; i++) {
      sy += y[i] * y[i];
      sd += drift[i] * drift[i];
    }
    const response = y.map((v, i) => v + Math.sqrt(sy / sd) * drift[i]);
    await writeFile(
      `${dir}/shaker.csv`,
      recordingCsv({
        rate,
        startTime: 0,
        channels: [
          { name: "force", unit: "N", data: force },
          { name: "arm", unit: "m", data: response },
        ],
      }),
    );
    const r = runQuiver([
      "frf",
      "shaker.csv",
      "--rate",
      String(rate),
      "--input",
      "force",
      "--outputs",
      "arm",
      "--block",
      "1024",
      "--out",
      "frf.csv",
    ], dir);
    expect(r.code, r.stderr).toBe(0);
  });

  test("--target-hz 35 is judged on the 35.4 Hz mode, names it and the noise peaks it skipped", () => {
    const r = runQuiver(["damping", "frf.csv", "--target-hz", "35"], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(
      /target: first mode >= 35 Hz: PASS \(35\.\d+ Hz, mode 1 of arm, margin 0\.\d+ Hz, [\d.]+ %; skipped \d+ candidate\(s\) below it flagged noise \(coherence below 0\.8 around them\): arm \d\.\d+ Hz/,
    );
    expect(r.stderr).toMatch(/arm mode 1: 35\.\d+ Hz/);
    expect(r.stderr).not.toMatch(/arm mode 2/);
    expect(r.stderr).toMatch(/arm: \d+ candidate\(s\) flagged noise, not modes: \d\.\d+/);
    // The noise peaks are rows of the table, flagged, with an empty mode cell.
    const rows = r.stdout.trim().split("\n").slice(1).map((l) => l.split(","));
    const noise = rows.filter((row) => row[6].split(";").includes("noise"));
    expect(noise.length).toBeGreaterThanOrEqual(2);
    for (const row of noise) expect(row[1]).toBe("");
    // A fit on noise collapses onto an undamped pole (ζ ~ 1e-16, Q ~ 1e15): such an estimate is
    // dropped (implausible_damping), never written as a number.
    for (const row of rows) {
      if (row[3] === "") continue;
      expect(Number(row[3])).toBeGreaterThanOrEqual(1e-6);
      expect(Number(row[3])).toBeLessThanOrEqual(1);
      expect(Number(row[4])).toBeLessThan(5e5);
    }
    expect(rows.some((row) => row[6].includes("implausible_damping"))).toBe(true);
    // The lowest row is a noise peak below 8 Hz: the first peak is not the first mode.
    expect(Number(rows[0][2])).toBeLessThan(8);
    expect(rows[0][1]).toBe("");
  });

  test("the same table and verdict with --max-hz 200, and with --min-hz 0 --max-hz 200", () => {
    const plain = runQuiver(["damping", "frf.csv", "--target-hz", "35"], dir);
    const max = runQuiver(["damping", "frf.csv", "--max-hz", "200", "--target-hz", "35"], dir);
    const both = runQuiver(
      ["damping", "frf.csv", "--min-hz", "0", "--max-hz", "200", "--target-hz", "35"],
      dir,
    );
    for (const r of [max, both]) {
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toBe(plain.stdout);
      expect(r.stderr).toBe(plain.stderr);
    }
  });

  test("--require-targets exits 0 on the real mode where the first peak would have failed", () => {
    const r = runQuiver(["damping", "frf.csv", "--target-hz", "35", "--require-targets"], dir);
    expect(r.code, r.stderr).toBe(0);
  });
});
