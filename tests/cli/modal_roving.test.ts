import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { simulateReceptance } from "../helpers/modal.ts";
import { gaussianNoise } from "../helpers/random.ts";

// A roving-hammer test of our own invention: a plate-like part with two modes, the
// accelerometer fixed at point 1, the hammer at points 1 … 4. By reciprocity the FRF with the
// hammer at p is H_1p = Σ_r φ_1r·φ_pr/(ω_r² − ω² + 2jζ_r·ω_r·ω) (Ewins, Modal Testing, 2.3),
// so across the files the residues trace each mode's shape over the points.
const MODES = [{ hz: 48, zeta: 0.012 }, { hz: 131, zeta: 0.008 }];
const SHAPES = [[1, 0.8, 0.35, -0.2], [1, -0.6, -0.9, 0.4]]; // φ_r at points 1 … 4
const RATE = 2048;

function hitRecording(point: number): string {
  const n = 12 * RATE;
  const force = new Float64Array(n);
  for (const at of [1, 3, 5, 7, 9]) {
    for (let i = 0; i < 12; i++) force[at * RATE + i] += 200 * Math.sin((Math.PI * (i + 0.5)) / 12);
  }
  const modes = MODES.map((m, r) => ({
    frequencyHz: m.hz,
    damping: m.zeta,
    // Modal constant of H_1p in (m/N)(rad/s)²: φ_1r·φ_pr for unit modal mass.
    residue: SHAPES[r][0] * SHAPES[r][point - 1],
  }));
  const x = simulateReceptance(modes, force, RATE);
  const noise = gaussianNoise(point, n);
  return recordingCsv({
    rate: RATE,
    startTime: 0,
    channels: [
      { name: "hammer", unit: "N", data: force },
      { name: "acc1", unit: "m", data: x.map((v, i) => v + 1e-9 * noise[i]) },
    ],
  });
}

describe("a roving-hammer campaign: hammer, then modal", () => {
  test("two modes and their shapes over four points, from raw recordings", async () => {
    const dir = await mkdtemp("/tmp/quiver-roving-");
    const frfs: string[] = [];
    for (let p = 1; p <= 4; p++) {
      await writeFile(`${dir}/tap_${p}.csv`, hitRecording(p));
      const r = runQuiver([
        "hammer",
        `${dir}/tap_${p}.csv`,
        "--force",
        "hammer",
        "--outputs",
        "acc1",
        "--rate",
        String(RATE),
        "--out",
        `${dir}/frf_${p}.csv`,
      ]);
      expect(r.code, r.stderr).toBe(0);
      frfs.push(`${dir}/frf_${p}.csv`);
    }
    const r = runQuiver([
      "modal",
      ...frfs,
      "--min-hz",
      "20",
      "--max-hz",
      "200",
      "--out",
      `${dir}/modes.csv`,
      "--shapes-out",
      `${dir}/shapes.csv`,
      "--stability-out",
      `${dir}/stability.csv`,
    ]);
    expect(r.code, r.stderr).toBe(0);
    const modes = (await readFile(`${dir}/modes.csv`, "utf8")).trim().split("\n").slice(1)
      .map((l) => l.split(",").map(Number));
    expect(modes).toHaveLength(2);
    modes.forEach(([, hz, zeta], i) => {
      expect(Math.abs(hz / MODES[i].hz - 1), `mode ${i + 1} frequency`).toBeLessThan(0.005);
      // The hammer's 1 s records end before these decays do; damping within 20 %.
      expect(Math.abs(zeta / MODES[i].zeta - 1), `mode ${i + 1} damping`).toBeLessThan(0.2);
    });
    // Shapes: the points are named by the files (the response is the same in each).
    const shapes = (await readFile(`${dir}/shapes.csv`, "utf8")).trim().split("\n").slice(1)
      .map((l) => l.split(","));
    for (let r = 0; r < 2; r++) {
      const rows = shapes.filter((s) => Number(s[0]) === r + 1);
      expect(rows.map((s) => s[1])).toEqual(["frf_1", "frf_2", "frf_3", "frf_4"]);
      // MAC with the true shape (real): (Σ φ·re)² + (Σ φ·im)² over norms (Allemang & Brown).
      let dre = 0, dim = 0, nf = 0, nh = 0;
      rows.forEach((s, p) => {
        const phi = SHAPES[r][p], re = Number(s[3]), im = Number(s[4]);
        dre += phi * re;
        dim += phi * im;
        nf += phi * phi;
        nh += re * re + im * im;
      });
      expect((dre * dre + dim * dim) / (nf * nh), `mode ${r + 1} MAC`).toBeGreaterThan(0.99);
    }
    const stability = await readFile(`${dir}/stability.csv`, "utf8");
    expect(stability.split("\n")[0]).toBe(
      "order,frequency_hz [Hz],damping_ratio,stable_frequency,stable_damping,stable_shape,mode",
    );
    // Each mode names the orders its cluster held a stable pole at, and the chart marks them.
    const marked = stability.trim().split("\n").slice(1).map((l) => Number(l.split(",")[6]));
    modes.forEach((row, i) => {
      expect(row[5], `mode ${i + 1} stable orders`).toBeGreaterThanOrEqual(5);
      expect(marked.filter((m) => m === i + 1).length).toBe(row[5]);
    });
  });
});
