/**
 * `quiver comfort` and `quiver hand-arm` on the command line: the table's
 * columns, the safety note, and bad input refused with exit code 2 (usage)
 * or 1 (data), one line on stderr, the output untouched.
 */
import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

let dir: string;
const sine = (rate: number, seconds: number, header: string, f: number[]) =>
  header + "\n" +
  Array.from({ length: rate * seconds }, (_, i) =>
    [
      i / rate,
      ...f.map((x) => Math.sin(2 * Math.PI * x * i / rate).toFixed(6)),
    ].join(",")).join(
      "\n",
    ) +
  "\n";

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-comfort-");
  await writeFile(
    `${dir}/seat.csv`,
    sine(1000, 3, "time_s,sx [g],sy [m/s^2],sz [mm/s^2],p [Pa]", [1, 2, 6, 3]),
  );
  await writeFile(`${dir}/out.csv`, "previous\n");
});

describe("quiver comfort", () => {
  test("three seat axes: rows x, y, z, sum with the issue's columns, and the safety note", () => {
    const r = runQuiver([
      "comfort",
      "seat.csv",
      "--x",
      "sx",
      "--y",
      "sy",
      "--z",
      "sz",
      "--location",
      "seat",
      "--purpose",
      "health",
    ], dir);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split("\n");
    expect(lines[0]).toBe(
      "axis,channel,weighting,k,aw [m/s^2],mtvv [m/s^2],vdv [m/s^1.75],crest_factor,mtvv_ratio,vdv_ratio,flags",
    );
    expect(lines.slice(1).map((l) => l.split(",").slice(0, 4).join(","))).toEqual([
      "x,sx,wd,1.4",
      "y,sy,wd,1.4",
      "z,sz,wk,1",
      "sum,,,",
    ]);
    expect(r.stderr).toMatch(/not a certified measurement of a person's exposure/);
  });

  const bad: [string, string[], number, RegExp][] = [
    ["no weighting and no axes", [], 2, /give --weighting \(with --channels\) or --x, --y and --z/],
    [
      "both",
      [
        "--weighting",
        "wk",
        "--x",
        "sx",
        "--y",
        "sy",
        "--z",
        "sz",
        "--location",
        "seat",
        "--purpose",
        "comfort",
      ],
      2,
      /one of them/,
    ],
    ["an unknown weighting", ["--weighting", "wz"], 2, /--weighting/],
    [
      "axes without a purpose",
      ["--x", "sx", "--y", "sy", "--z", "sz", "--location", "seat"],
      2,
      /need --location and --purpose/,
    ],
    [
      "health at the feet",
      ["--x", "sx", "--y", "sy", "--z", "sz", "--location", "feet", "--purpose", "health"],
      2,
      /no axis factors for health at location feet/,
    ],
    [
      "a channel in Pa",
      ["--weighting", "wk", "--channels", "p"],
      2,
      /channel "p" is in Pa, not an acceleration/,
    ],
    ["an unknown channel", ["--weighting", "wk", "--channels", "q"], 2, /no channel named "q"/],
    ["a rate too low for Wh", ["--weighting", "wh", "--channels", "sz"], 2, /at least 5035\.6 Hz/],
  ];
  for (const [what, args, code, pattern] of bad) {
    test(`refuses ${what}, writing nothing`, async () => {
      const before = (await readdir(dir)).sort();
      const r = runQuiver(["comfort", "seat.csv", ...args, "--out", "out.csv"], dir);
      expect(r.code).toBe(code);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("previous\n");
      expect((await readdir(dir)).sort()).toEqual(before);
    });
  }
});

describe("units", () => {
  test("the same samples in g, m/s² and mm/s²: a_w and VDV scale by g_n and 10⁻³", async () => {
    const numbers = sine(1000, 3, "time_s,a [m/s^2],b [g],c [mm/s^2]", [5, 5, 5]);
    await writeFile(`${dir}/units.csv`, numbers);
    const r = runQuiver(
      ["comfort", "units.csv", "--weighting", "wk", "--out", "units.json"],
      dir,
    );
    expect(r.code).toBe(0);
    const rows = JSON.parse(await readFile(`${dir}/units.json`, "utf8")).metadata.rows;
    const [a, b, c] = rows as { aw: number; vdv: number }[];
    // g_n = 9.80665 m/s² exactly (ISO 80000-3:2019, standard acceleration of free fall); the
    // weighting filter is linear, so a_w and VDV scale with the unit's factor.
    expect(Math.abs(b.aw / a.aw / 9.80665 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(b.vdv / a.vdv / 9.80665 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(c.aw / a.aw / 1e-3 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(c.vdv / a.vdv / 1e-3 - 1)).toBeLessThan(1e-12);
  });
});

describe("quiver hand-arm", () => {
  const bad: [string, string[], number, RegExp][] = [
    ["a missing axis", ["--x", "sx", "--y", "sy"], 2, /--z/],
    [
      "an exposure time of 0",
      ["--x", "sx", "--y", "sy", "--z", "sz", "--exposure-hours", "0"],
      2,
      /must be a positive number of hours/,
    ],
    [
      "a rate below Wh's least",
      ["--x", "sx", "--y", "sy", "--z", "sz"],
      2,
      /weighting wh needs a sample rate of at least 5035\.6 Hz/,
    ],
  ];
  for (const [what, args, code, pattern] of bad) {
    test(`refuses ${what}, writing nothing`, async () => {
      const r = runQuiver(["hand-arm", "seat.csv", ...args, "--out", "out.csv"], dir);
      expect(r.code).toBe(code);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("previous\n");
    });
  }

  test("three axes at 6 kHz: a_hv in the sum row and A(8) in the JSON", async () => {
    await writeFile(
      `${dir}/wheel.csv`,
      sine(6000, 2, "time_s,wx [m/s^2],wy [m/s^2],wz [m/s^2]", [16, 31.5, 125]),
    );
    const r = runQuiver([
      "hand-arm",
      "wheel.csv",
      "--x",
      "wx",
      "--y",
      "wy",
      "--z",
      "wz",
      "--exposure-hours",
      "2",
      "--out",
      "w.json",
    ], dir);
    expect(r.code).toBe(0);
    const m = JSON.parse(await readFile(`${dir}/w.json`, "utf8")).metadata;
    expect(m.analysis).toBe("hand-arm");
    expect(m.a8).toBeCloseTo(m.a_hv / 2, 12);
    expect(m.safety).toMatch(/defer to local regulations and licensed practice/);
    expect(r.stderr).toMatch(/a_hv .* m\/s\^2, A\(8\) .* for 2 h/);
  });
});
