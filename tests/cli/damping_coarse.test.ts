import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { type Mode, simulateReceptance } from "../helpers/modal.ts";
import { gaussianNoise } from "../helpers/random.ts";

// A short, coarse shaker run of our own arm: 8000 samples at 2048 Hz, FRF with block 1024
// (df 2 Hz, 14 averages). Two modes, 61 Hz (ζ 3 %) and 173 Hz (ζ 2 %); above ~400 Hz the
// response is at the noise floor and the FRF there is noise.
const MODES: Mode[] = [
  { frequencyHz: 61, damping: 0.03, residue: 3e3 },
  { frequencyHz: 173, damping: 0.02, residue: 2e3 },
];

describe("damping on a short, coarse shaker FRF with default settings", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-damping-coarse-");
    const rate = 2048;
    const force = gaussianNoise(5, 8000);
    const y = simulateReceptance(MODES, force, rate);
    const noise = gaussianNoise(6, 8000);
    let ms = 0;
    for (const v of y) ms += v * v / y.length;
    const response = y.map((v, i) => v + 0.02 * Math.sqrt(ms) * noise[i]);
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
      "2048",
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

  for (const method of ["both", "half-power", "sdof-fit"]) {
    test(`--method ${method}: exit 0, the two modes found, no NaN cells, noise peaks flagged and not numbered`, async () => {
      const r = runQuiver(
        ["damping", "frf.csv", "--method", method, "--out", `m_${method}.csv`],
        dir,
      );
      expect(r.code, r.stderr).toBe(0);
      expect(r.stderr).toMatch(/candidate peak\(s\) of "arm" flagged noise/);
      const text = await readFile(`${dir}/m_${method}.csv`, "utf8");
      expect(text).not.toMatch(/NaN/);
      const rows = text.trim().split("\n").slice(1).map((l) => l.split(","));
      // Rows with a mode number are modes; the others are candidates flagged noise.
      const modes = rows.filter((row) => row[1] !== "");
      const noise = rows.filter((row) => row[1] === "");
      // Both modes within 2 lines (4 Hz) of the truth; nothing else is a mode (common
      // practice: a peak that the FRF's coherence does not support is not a mode).
      expect(modes.map((row) => row[1])).toEqual(["1", "2"]);
      expect(Math.abs(Number(modes[0][2]) - 61)).toBeLessThan(4);
      expect(Math.abs(Number(modes[1][2]) - 173)).toBeLessThan(4);
      for (const row of modes) expect(row[6]).not.toMatch(/noise/);
      // The noise floor above ~400 Hz: listed, flagged, never a mode.
      expect(noise.length).toBeGreaterThan(0);
      for (const row of noise) {
        expect(row[6].split(";")).toContain("noise");
        expect(Number(row[2])).toBeGreaterThan(300);
      }
    });
  }

  test("--target-hz: a failed target exits 0 by default and 4 with --require-targets", () => {
    // The first mode is near 61 Hz (the simulated arm), below a 100 Hz minimum.
    const plain = runQuiver(["damping", "frf.csv", "--target-hz", "100", "--out", "t1.csv"], dir);
    expect(plain.code).toBe(0);
    expect(plain.stderr).toMatch(/target: first mode >= 100 Hz: FAIL/);
    const strict = runQuiver(
      ["damping", "frf.csv", "--target-hz", "100", "--require-targets", "--out", "t2.csv"],
      dir,
    );
    expect(strict.code).toBe(4);
    const met = runQuiver(
      ["damping", "frf.csv", "--target-hz", "50", "--require-targets", "--out", "t3.csv"],
      dir,
    );
    expect(met.code).toBe(0);
  });
});
