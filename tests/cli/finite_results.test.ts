import { existsSync } from "node:fs";
import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { readResultFile } from "../../lib/io/result_file.ts";
import { parseShapes } from "../../lib/modal/shapes.ts";
import { runQuiver } from "../helpers/cli.ts";

const RATE = 1024;

/** A CSV recording of `n` rows: a time column, then one cell per column from `cell(column, i)`. */
function recording(header: readonly string[], n: number, cell: (c: number, i: number) => number) {
  const rows = [["time_s", ...header].join(",")];
  for (let i = 0; i < n; i++) {
    rows.push([String(i / RATE), ...header.map((_, c) => String(cell(c, i)))].join(","));
  }
  return rows.join("\n") + "\n";
}

const tone = (i: number) => Math.sin((2 * Math.PI * 64 * i) / RATE);

describe("results are finite or refused with the reason", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-finite-");
  });

  test("a spectrum of a record with a 1e308 sample is refused as an overflow, naming the channel", async () => {
    // 1e308² exceeds the largest double (about 1.8e308): IEEE 754 overflows to infinity.
    await writeFile(
      `${dir}/big.csv`,
      recording(["ok [V]", "big [V]"], 2048, (c, i) => c === 1 && i === 5 ? 1e308 : tone(i)),
    );
    const r = runQuiver(["spectrum", "big.csv", "--block", "256", "--out", "s.csv"], dir);
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/big\.csv: channel "big": the spectrum overflows .*IEEE 754/);
    expect(existsSync(`${dir}/s.csv`)).toBe(false);
  });

  test("an FRF with an all-zero force is refused as a dead input, naming the channel", async () => {
    await writeFile(
      `${dir}/dead.csv`,
      recording(["force [N]", "acc [m/s^2]"], 2048, (c, i) => c === 0 ? 0 : tone(i)),
    );
    const r = runQuiver(
      [
        "frf",
        "dead.csv",
        "--block",
        "256",
        "--input",
        "force",
        "--outputs",
        "acc",
        "--out",
        "f.csv",
      ],
      dir,
    );
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/dead\.csv: input channel "force" is dead/);
    expect(existsSync(`${dir}/f.csv`)).toBe(false);
  });

  test("a sensitivity that is zero, negative, non-finite or absurd is refused, naming channel and value", async () => {
    await writeFile(`${dir}/volts.csv`, recording(["acc [mV]"], 512, (_, i) => tone(i)));
    // 1e999 is how JSON spells a number that parses to Infinity; 1e-300 would make volts·1000/s
    // overflow for any real voltage, 1e300 would make every sample vanish towards 0.
    for (
      const [text, shown] of [["0", "0"], ["-10", "-10"], ["1e999", "Infinity"], [
        "1e-300",
        "1e-300",
      ], ["1e300", "1e+300"]]
    ) {
      await writeFile(
        `${dir}/setup.json`,
        `{"channels": {"acc": {"unit": "m/s^2", "sensitivity_mv_per_unit": ${text}}}}`,
      );
      const r = runQuiver(
        ["spectrum", "volts.csv", "--setup", "setup.json", "--block", "256"],
        dir,
      );
      expect(r.code, text).toBe(1);
      expect(r.stderr, text).toContain(
        `set-up channel "acc": sensitivity_mv_per_unit ${shown} is out of range; quiver accepts 0.000001 … 1000000 mV per unit`,
      );
    }
    // The ends of the range are accepted (an automatic limit: tested on both sides).
    for (const text of ["0.000001", "1000000"]) {
      await writeFile(
        `${dir}/setup.json`,
        `{"channels": {"acc": {"unit": "m/s^2", "sensitivity_mv_per_unit": ${text}}}}`,
      );
      const r = runQuiver(
        ["spectrum", "volts.csv", "--setup", "setup.json", "--block", "256"],
        dir,
      );
      expect(r.code, `${text}: ${r.stderr}`).toBe(0);
      expect(r.stdout).not.toMatch(/NaN|Infinity/);
    }
  });

  test("dB of zero power is an empty cell with its reason, read back as no value", async () => {
    await writeFile(
      `${dir}/quiet.csv`,
      recording(["mic [Pa]", "dead [Pa]"], 4096, (c, i) => c === 0 ? 0.1 * tone(i) : 0),
    );
    const r = runQuiver(["bands", "quiet.csv", "--out", "b.csv"], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).not.toMatch(/NaN|Infinity/);
    expect(r.stderr).toContain(
      "dead: overall level not defined: the bands hold no power (a silent channel?)",
    );
    const csv = await readFile(`${dir}/b.csv`, "utf8");
    expect(csv).not.toMatch(/NaN|Infinity/);
    expect(csv.split("\n")[1]).toMatch(/,-?\d[^,]*,$/); // the dead channel's cell is empty
    const sidecar = JSON.parse(await readFile(`${dir}/b.csv.meta.json`, "utf8"));
    expect(sidecar.metadata.empty_cells).toEqual([
      expect.objectContaining({
        column: "dead",
        first_row: 0,
        reason: expect.stringMatching(/dB \(logarithm\) of zero/),
      }),
    ]);
    const back = await readResultFile(`${dir}/b.csv`);
    const dead = back.columns.find((c) => c.name === "dead")?.values as Float64Array;
    expect(dead.length).toBeGreaterThan(0);
    expect(dead.every((v) => Number.isNaN(v))).toBe(true);
    const json = runQuiver(["bands", "quiet.csv", "--out", "b.json"], dir);
    expect(json.code, json.stderr).toBe(0);
    const parsed = JSON.parse(await readFile(`${dir}/b.json`, "utf8"));
    const deadJson = parsed.columns.find((c: { name: string }) => c.name === "dead");
    expect(deadJson.values.every((v: unknown) => v === null)).toBe(true);
    expect(parsed.metadata.empty_cells[0].column).toBe("dead");
  });
});

describe("names from files are names, never keys into an object's prototype", () => {
  test("channels called constructor, toString and __proto__ keep their names", async () => {
    const dir = await mkdtemp("/tmp/quiver-names-");
    await writeFile(
      `${dir}/r.csv`,
      recording(
        ["constructor [m/s^2]", "toString [N]", "__proto__ [mV]"],
        1024,
        (c, i) => (c + 1) * tone(i),
      ),
    );
    // The set-up converts __proto__ from mV (a key zod's record would drop) and renames it.
    await writeFile(
      `${dir}/setup.json`,
      JSON.stringify({ channels: { toString: { role: "force" } } }).replace(
        "}}}",
        '}, "__proto__": {"unit": "m/s^2", "sensitivity_mv_per_unit": 10, "name": "hasOwnProperty"}}}',
      ),
    );
    const r = runQuiver([
      "spectrum",
      "r.csv",
      "--setup",
      "setup.json",
      "--block",
      "256",
      "--kind",
      "rms",
      "--out",
      "s.csv",
    ], dir);
    expect(r.code, r.stderr).toBe(0);
    const csv = await readFile(`${dir}/s.csv`, "utf8");
    expect(csv.split("\n")[0]).toBe(
      "frequency_hz,constructor [m/s^2],toString [N],hasOwnProperty [m/s^2]",
    );
    // __proto__ holds 3·tone in mV; at 10 mV per m/s^2 that is 0.3·tone in m/s^2, against
    // constructor's 1·tone: the set-up entry applied once, to its own channel.
    const line = csv.split("\n")[1 + 16].split(",").map(Number); // 64 Hz at df 4 Hz
    expect(line[3] / line[1]).toBeCloseTo(0.3, 6); // (3 mV / 10 mV per unit) / 1 unit
  });

  test("a control character in a channel name is refused at read time, shown escaped", async () => {
    const dir = await mkdtemp("/tmp/quiver-names-");
    await writeFile(
      `${dir}/r.csv`,
      recording(["ok [V]", "b\u001b[2Jc\u0007 [V]"], 512, (_, i) => tone(i)),
    );
    const r = runQuiver(["spectrum", "r.csv", "--block", "256"], dir);
    expect(r.code).toBe(1);
    expect(r.stderr).not.toContain("\u0007");
    expect(r.stderr).not.toContain("\u001b");
    expect(r.stderr).toContain(
      'r.csv:1:3: column 3: the name "b\\u001b[2Jc\\u0007" holds a control',
    );
  });

  test("a right-to-left override in a set-up rename is refused", async () => {
    const dir = await mkdtemp("/tmp/quiver-names-");
    await writeFile(`${dir}/r.csv`, recording(["acc [m/s^2]"], 512, (_, i) => tone(i)));
    await writeFile(
      `${dir}/setup.json`,
      JSON.stringify({ channels: { acc: { name: "acc\u202eZ" } } }),
    );
    const r = runQuiver(["spectrum", "r.csv", "--setup", "setup.json", "--block", "256"], dir);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('set-up channel "acc": new name: the name "acc\\u202eZ" holds');
  });
});

describe("a shapes file that modal writes is read back by mac", () => {
  test("directions +z and -x survive the formula guard", async () => {
    const dir = await mkdtemp("/tmp/quiver-shapes-");
    // Receptances of two modes at three points, from the closed form
    // H_p(ω) = Σ_r φ_1r·φ_pr/(ω_r² − ω² + 2jζ_r·ω_r·ω) (Ewins, Modal Testing, 2.3).
    const modes = [{ hz: 60, zeta: 0.01, phi: [1, 0.7, -0.5] }, {
      hz: 150,
      zeta: 0.015,
      phi: [1, -0.8, 0.9],
    }];
    const rows = [
      "frequency_hz,p1_re [m/N],p1_im [m/N],p2_re [m/N],p2_im [m/N],p3_re [m/N],p3_im [m/N]",
    ];
    for (let k = 0; k <= 800; k++) {
      const f = k / 2, w = 2 * Math.PI * f;
      const cells = [String(f)];
      for (let p = 0; p < 3; p++) {
        let re = 0, im = 0;
        for (const m of modes) {
          const wr = 2 * Math.PI * m.hz, a = m.phi[0] * m.phi[p];
          const dr = wr * wr - w * w, di = 2 * m.zeta * wr * w, d2 = dr * dr + di * di;
          re += (a * dr) / d2;
          im -= (a * di) / d2;
        }
        cells.push(String(re), String(im));
      }
      rows.push(cells.join(","));
    }
    await writeFile(`${dir}/frfs.csv`, rows.join("\n") + "\n");
    await writeFile(
      `${dir}/dofs.csv`,
      "file,column,point,direction\nfrfs,p1,1,+z\nfrfs,p2,2,-x\nfrfs,p3,3,+z\n",
    );
    const m = runQuiver(
      [
        "modal",
        "frfs.csv",
        "--dofs",
        "dofs.csv",
        "--min-hz",
        "20",
        "--max-hz",
        "300",
        "--out",
        "modes.csv",
        "--shapes-out",
        "shapes.csv",
      ],
      dir,
    );
    expect(m.code, m.stderr).toBe(0);
    const shapes = await readFile(`${dir}/shapes.csv`, "utf8");
    // Guarded for spreadsheets (OWASP CSV Injection: + and - start formulas) …
    expect(shapes).toContain(",'+z,");
    expect(shapes).toContain(",'-x,");
    // … and read back by quiver as written.
    const parsed = parseShapes(shapes);
    expect([...parsed[0].values.keys()]).toEqual(["1 +z", "2 -x", "3 +z"]);
    await writeFile(
      `${dir}/sim.csv`,
      "mode,frequency_hz,point,direction,value\n" +
        "1,61,1,+z,1\n1,61,2,-x,0.7\n1,61,3,+z,-0.5\n2,149,1,+z,1\n2,149,2,-x,-0.8\n2,149,3,+z,0.9\n",
    );
    const r = runQuiver(["mac", "shapes.csv", "sim.csv", "--out", "mac.json"], dir);
    expect(r.code, r.stderr).toBe(0);
    const mac = JSON.parse(await readFile(`${dir}/mac.json`, "utf8"));
    expect(mac.metadata.dofs_used).toBe(3);
    expect(mac.metadata.dofs_test_only).toBe(0);
    // The fitted shapes are the simulated ones: MAC 1 on the diagonal (Allemang & Brown 1982).
    for (const pair of mac.metadata.pairs) expect(pair.mac).toBeGreaterThan(0.999);
  });
});
