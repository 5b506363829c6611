import { readFileSync } from "node:fs";
import { mkdtemp, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { gaussianNoise } from "../helpers/random.ts";

// A small three-mount recording: inputs partly correlated through a common source.
let dir = "";
beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-frf-inputs-");
  const n = 16384;
  const s = gaussianNoise(1, n), u = [2, 3, 4].map((seed) => gaussianNoise(seed, n));
  const x = u.map((ui, i) => ui.map((v, k) => v + (0.5 + 0.2 * i) * s[k]));
  const y = x[0].map((v, k) => 2 * v - x[1][k] + 0.5 * x[2][k] + 0.05 * u[0][(k + 7) % n]);
  const rows = ["time_s,mount_a [N],mount_b [N],mount_c [N],cabin [Pa]"];
  for (let k = 0; k < n; k++) rows.push(`${k / 1024},${x[0][k]},${x[1][k]},${x[2][k]},${y[k]}`);
  await writeFile(`${dir}/mounts.csv`, rows.join("\n") + "\n");
});

describe("quiver frf --inputs", () => {
  test("one name in --inputs gives the single-input result to the last byte", () => {
    const a = runQuiver(["frf", `${dir}/mounts.csv`, "--input", "mount_a", "--outputs", "cabin"]);
    const b = runQuiver(["frf", `${dir}/mounts.csv`, "--inputs", "mount_a", "--outputs", "cabin"]);
    expect(a.code).toBe(0);
    expect(b.code).toBe(0);
    expect(b.stdout).toBe(a.stdout);
  });

  test("several inputs: the FRF matrix, partial and principal tables with documented columns", () => {
    const r = runQuiver([
      "frf",
      `${dir}/mounts.csv`,
      "--inputs",
      "mount_a,mount_b,mount_c",
      "--outputs",
      "cabin",
      "--block",
      "512",
      "--out",
      `${dir}/matrix.csv`,
      "--partial-out",
      `${dir}/partial.csv`,
      "--principal-out",
      `${dir}/principal.json`,
    ]);
    expect(r.code, r.stderr).toBe(0);
    const header = readFileSync(`${dir}/matrix.csv`, "utf8").split("\n")[0];
    expect(header).toBe(
      "frequency_hz,cabin/mount_a_re [Pa/N],cabin/mount_a_im [Pa/N],cabin/mount_a_mag [Pa/N]," +
        "cabin/mount_a_phase_deg [deg],cabin/mount_b_re [Pa/N],cabin/mount_b_im [Pa/N]," +
        "cabin/mount_b_mag [Pa/N],cabin/mount_b_phase_deg [deg],cabin/mount_c_re [Pa/N]," +
        "cabin/mount_c_im [Pa/N],cabin/mount_c_mag [Pa/N],cabin/mount_c_phase_deg [deg]," +
        "cabin_multiple_coherence,gxx_condition",
    );
    // y = 2a − b + 0.5c: the magnitudes at a mid line (the documented model; noise 0.05).
    const row = readFileSync(`${dir}/matrix.csv`, "utf8").split("\n")[100].split(",").map(Number);
    expect(Math.abs(row[3] - 2)).toBeLessThan(0.05);
    expect(Math.abs(row[7] - 1)).toBeLessThan(0.05);
    expect(Math.abs(row[11] - 0.5)).toBeLessThan(0.05);
    const meta = JSON.parse(readFileSync(`${dir}/matrix.csv.meta.json`, "utf8")).metadata;
    expect(meta.analysis).toBe("frf_matrix");
    expect(meta.inputs.map((c: { name: string }) => c.name)).toEqual([
      "mount_a",
      "mount_b",
      "mount_c",
    ]);
    expect(readFileSync(`${dir}/partial.csv`, "utf8").split("\n")[0]).toContain(
      "cabin/mount_b_partial_coherence",
    );
    const principal = JSON.parse(readFileSync(`${dir}/principal.json`, "utf8"));
    expect(principal.metadata.analysis).toBe("frf_principal");
    expect(principal.columns.map((c: { name: string }) => c.name)).toContain(
      "cabin/pc3_virtual_coherence",
    );
    expect(principal.columns.find((c: { name: string }) => c.name === "pc1").unit).toBe("N^2/Hz");
  });

  test("usage errors: both --input and --inputs, h2 with several inputs, a companion file without --inputs", () => {
    const both = runQuiver([
      "frf",
      `${dir}/mounts.csv`,
      "--input",
      "mount_a",
      "--inputs",
      "mount_b,mount_c",
      "--outputs",
      "cabin",
    ]);
    expect(both.code).toBe(2);
    expect(both.stderr).toMatch(/--input .* or --inputs/);
    const h2 = runQuiver([
      "frf",
      `${dir}/mounts.csv`,
      "--inputs",
      "mount_a,mount_b",
      "--outputs",
      "cabin",
      "--estimator",
      "h2",
    ]);
    expect(h2.code).toBe(2);
    expect(h2.stderr).toMatch(/only --estimator h1/);
    const lone = runQuiver([
      "frf",
      `${dir}/mounts.csv`,
      "--input",
      "mount_a",
      "--outputs",
      "cabin",
      "--partial-out",
      `${dir}/x.csv`,
    ]);
    expect(lone.code).toBe(2);
    expect(lone.stderr).toMatch(/need --inputs/);
  });
});
