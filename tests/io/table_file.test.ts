import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { existsSync } from "node:fs";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

// A 2.0-unit-RMS tone's spectra written twice, as PSD and as RMS; then the halves of the
// two CSV+sidecar pairs are mixed, as a kill between the two renames (or a careless copy)
// would leave them.
describe("a CSV result and its sidecar belong together", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-pair-");
    const rate = 1024;
    const rows = ["acc [m/s^2]"];
    for (let i = 0; i < 16 * 1024; i++) {
      rows.push(String(2 * Math.SQRT2 * Math.sin(2 * Math.PI * 64 * i / rate)));
    }
    await writeFile(`${dir}/tone.csv`, rows.join("\n") + "\n");
    for (const kind of ["psd", "rms"]) {
      const r = runQuiver([
        "spectrum",
        "tone.csv",
        "--rate",
        "1024",
        "--block",
        "1024",
        "--kind",
        kind,
        "--out",
        `${kind}.csv`,
      ], dir);
      expect(r.code, r.stderr).toBe(0);
    }
  });

  test("the sidecar carries the CSV's hash and columns", async () => {
    const sidecar = JSON.parse(await readFile(`${dir}/rms.csv.meta.json`, "utf8"));
    expect(sidecar.csv_sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(sidecar.columns[1]).toEqual({ name: "acc", unit: "m/s^2" });
  });

  test("an RMS CSV beside a PSD sidecar is refused, not read as a PSD", async () => {
    // Read as a PSD, RMS against RMS would give 10·lg instead of 20·lg: 3.01 dB where the
    // truth is 6.02 dB. quiver must refuse the mixed pair, naming the sidecar.
    await writeFile(`${dir}/mixed.csv`, await readFile(`${dir}/rms.csv`));
    await writeFile(`${dir}/mixed.csv.meta.json`, await readFile(`${dir}/psd.csv.meta.json`));
    const r = runQuiver(["compare", "mixed.csv", "rms.csv", "--out", "d.csv"], dir);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/mixed\.csv\.meta\.json: does not belong to mixed\.csv/);
    expect(existsSync(`${dir}/d.csv`)).toBe(false);
  });

  test("a sidecar whose columns differ from the CSV header is refused", async () => {
    const csv = (await readFile(`${dir}/rms.csv`, "utf8")).replace("acc [m/s^2]", "acc [g]");
    await writeFile(`${dir}/edited.csv`, csv);
    const sidecar = JSON.parse(await readFile(`${dir}/rms.csv.meta.json`, "utf8"));
    // A forger who also fixes the hash still meets the column check.
    const { createHash } = await import("node:crypto");
    sidecar.csv_sha256 = createHash("sha256").update(csv).digest("hex");
    await writeFile(`${dir}/edited.csv.meta.json`, JSON.stringify(sidecar));
    const r = runQuiver(["damping", "edited.csv", "--out", "m.csv"], dir);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/differ from the CSV header/);
  });

  test("a failed sidecar write leaves neither half of the new pair", async () => {
    // The sidecar's place is taken by a folder, so its rename fails after the CSV's.
    const { mkdir } = await import("node:fs/promises");
    await mkdir(`${dir}/blocked.csv.meta.json`);
    const r = runQuiver(
      ["spectrum", "tone.csv", "--rate", "1024", "--block", "1024", "--out", "blocked.csv"],
      dir,
    );
    expect(r.code).not.toBe(0);
    expect(existsSync(`${dir}/blocked.csv`)).toBe(false);
  });
});
