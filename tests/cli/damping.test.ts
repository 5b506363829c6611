import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { type CliResult, runQuiver } from "../helpers/cli.ts";
import { sixHitsCli } from "../helpers/hammer_recording.ts";
import { type Mode, receptance } from "../helpers/modal.ts";

describe("quiver damping", () => {
  let dir: string;
  let hammer: (args: string[]) => CliResult;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-damping-");
    hammer = await sixHitsCli(dir);
  });

  test("reads a hammer FRF with its sidecar and corrects the exponential window", async () => {
    const h = hammer([
      "--outputs",
      "bracket_a",
      "--exp-window",
      "0.5",
      "--out",
      `${dir}/frf.csv`,
    ]);
    expect(h.code).toBe(0);
    const d = runQuiver([
      "damping",
      `${dir}/frf.csv`,
      "--max-hz",
      "250",
      "--out",
      `${dir}/modes.csv`,
    ]);
    expect(d.code).toBe(0);
    const rows = (await readFile(`${dir}/modes.csv`, "utf8")).trim().split("\n");
    expect(rows[0]).toBe(
      "channel,mode,frequency_hz,damping_ratio,q_factor,method,flags,half_power_frequency_hz," +
        "half_power_damping_ratio,lines_in_half_power_band,fit_frequency_hz,fit_damping_ratio," +
        "peak_coherence,window_correction",
    );
    expect(rows).toHaveLength(3);
    const first = rows[1].split(",");
    // Simulated: 42.5 Hz, ζ = 2 % (tests/helpers/hammer_recording.ts); the window adds 1/(τωₙ).
    expect(Math.abs(Number(first[2]) / 42.5 - 1)).toBeLessThan(0.005);
    expect(Math.abs(Number(first[3]) / 0.02 - 1)).toBeLessThan(0.1);
    expect(Number(first[13])).toBeCloseTo(1 / (0.5 * 2 * Math.PI * Number(first[2])), 6);
    expect(d.stderr).toMatch(/bracket_a mode 1: 42\.\d+ Hz/);
  });

  test("reads a solver's plain table (mag and phase, semicolons, decimal commas) and checks a target", async () => {
    const modes: Mode[] = [
      { frequencyHz: 36.8, damping: 0.015, residue: 1e4 },
      { frequencyHz: 92.1, damping: 0.01, residue: -6e3 },
    ];
    const rows = ["frequency_hz;mag;phase_deg"];
    for (let f = 0.5; f <= 200; f += 0.5) {
      const h = receptance(modes, f);
      const fmt = (v: number) => v.toPrecision(10).replace(".", ",");
      rows.push(
        [fmt(f), fmt(Math.hypot(h.re, h.im)), fmt((Math.atan2(h.im, h.re) * 180) / Math.PI)].join(
          ";",
        ),
      );
    }
    await writeFile(`${dir}/solver.csv`, rows.join("\n") + "\n");
    const pass = runQuiver([
      "damping",
      `${dir}/solver.csv`,
      "--form",
      "receptance",
      "--target-hz",
      "35",
    ]);
    expect(pass.code).toBe(0);
    expect(pass.stderr).toMatch(/target: first mode >= 35 Hz: PASS \(36\.8\d* Hz/);
    const lines = pass.stdout.trim().split("\n");
    expect(lines).toHaveLength(3);
    expect(Math.abs(Number(lines[2].split(",")[3]) / 0.01 - 1)).toBeLessThan(0.05);
    const fail = runQuiver([
      "damping",
      `${dir}/solver.csv`,
      "--target-hz",
      "40",
      "--format",
      "json",
    ]);
    expect(fail.stderr).toMatch(/FAIL/);
    const json = JSON.parse(fail.stdout);
    expect(json.metadata.target.pass).toBe(false);
    expect(json.metadata.modes[0].flags).toContain("form_assumed");
  });

  test("refuses a table without frequencies, and an unknown channel", async () => {
    await writeFile(`${dir}/bad.csv`, "f,re,im\n1,2,3\n");
    const bad = runQuiver(["damping", `${dir}/bad.csv`]);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/bad\.csv: no "frequency_hz" column/);
    await writeFile(`${dir}/one.csv`, "frequency_hz,re,im\n1,2,3\n2,3,4\n");
    const unknown = runQuiver(["damping", `${dir}/one.csv`, "--channel", "hub"]);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toMatch(/no FRF named "hub"/);
  });
});
