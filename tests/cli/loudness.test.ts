/**
 * `quiver loudness` on the command line: the columns for both
 * methods, the side outputs, the safety note, and bad input refused with
 * exit code 2 (usage) or 1 (data), one line on stderr, the output untouched.
 */
import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

let dir: string;

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-loudness-");
  const rate = 16000, rows: string[] = [];
  // 1 kHz at 60 dB SPL in p; the same in the acceleration a, which is not sound pressure.
  const amplitude = Math.SQRT2 * 20e-6 * 1000;
  for (let i = 0; i < rate * 2; i++) {
    const v = (amplitude * Math.sin(2 * Math.PI * 1000 * i / rate)).toFixed(8);
    rows.push(`${i / rate},${v},${v}`);
  }
  await writeFile(`${dir}/cabin.csv`, "time_s,p [Pa],a [m/s^2]\n" + rows.join("\n") + "\n");
  await writeFile(`${dir}/accel.csv`, "time_s,a [m/s^2]\n0,1\n0.001,2\n0.002,3\n");
  await writeFile(`${dir}/out.csv`, "previous\n");
});

describe("quiver loudness", () => {
  test(
    "stationary: one row per Pa channel with the issue's columns, N′ tidy, the note",
    async () => {
      const r = runQuiver(["loudness", "cabin.csv", "--specific-out", "n.csv"], dir);
      expect(r.code).toBe(0);
      const lines = r.stdout.trim().split("\n");
      expect(lines[0]).toBe("channel,loudness [sone],loudness_level [phon],sharpness [acum]");
      expect(lines).toHaveLength(2);
      expect(lines[1].startsWith("p,")).toBe(true);
      // 1 kHz at 60 dB: 4 sone by the sone's definition (ISO 532-1 clause 3); 30 % allowed for the
      // filters' skirts and the tables from memory (README, loudness).
      const n = Number(lines[1].split(",")[1]);
      expect(n).toBeGreaterThan(4 * 0.9);
      expect(n).toBeLessThan(4 * 1.3);
      const specific = (await readFile(`${dir}/n.csv`, "utf8")).trim().split("\n");
      expect(specific[0]).toBe("channel,z [Bark],specific_loudness [sone/Bark]");
      expect(specific).toHaveLength(241);
      expect(r.stderr).toMatch(/not a certified sound level or loudness meter/);
    },
    120_000,
  );

  test("time-varying: n5 and n10 columns and the history", async () => {
    const r = runQuiver(
      ["loudness", "cabin.csv", "--method", "time-varying", "--history-out", "h.json"],
      dir,
    );
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")[0]).toBe(
      "channel,loudness [sone],loudness_level [phon],sharpness [acum],n5 [sone],n10 [sone]",
    );
    const h = JSON.parse(await readFile(`${dir}/h.json`, "utf8"));
    expect(JSON.stringify(h)).toContain("p:sharpness");
  }, 120_000);

  const bad: [string, string, string[], number, RegExp][] = [
    [
      "a channel not in Pa",
      "cabin.csv",
      ["--channels", "a"],
      1,
      /channel "a" is in m\/s\^2, not Pa/,
    ],
    ["a recording without Pa", "accel.csv", [], 1, /no channel in Pa/],
    ["an unknown field", "cabin.csv", ["--field", "open"], 2, /--field/],
    [
      "history with stationary",
      "cabin.csv",
      ["--history-out", "h2.json"],
      2,
      /needs --method time-varying/,
    ],
    ["an unknown channel", "cabin.csv", ["--channels", "q"], 2, /no channel named "q"/],
  ];
  for (const [what, file, args, code, pattern] of bad) {
    test(`refuses ${what}, writing nothing`, async () => {
      const before = (await readdir(dir)).sort();
      const r = runQuiver(["loudness", file, ...args, "--out", "out.csv"], dir);
      expect(r.code).toBe(code);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("previous\n");
      expect((await readdir(dir)).sort()).toEqual(before);
    }, 120_000);
  }
});
