import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { runQuiver } from "../helpers/cli.ts";

// A road run of our own: 6 s at 1024 Hz, a 100 Hz tone of 1 rms from 2 s to 4 s only, and
// a little noise-free 37 Hz component throughout. The time axis starts at 10 s.
const RATE = 1024;
const START = 10;
const value = (i: number) => {
  const t = START + i / RATE;
  const tone = t >= 12 && t < 14 ? Math.SQRT2 * Math.sin(2 * Math.PI * 100 * t) : 0;
  return tone + 0.1 * Math.sin(2 * Math.PI * 37 * t);
};

describe("--start and --end: a time slice of the recording, in every command and in plans", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-slice-");
    const rows = ["time_s,acc [m/s^2]"];
    for (let i = 0; i < 6 * RATE; i++) rows.push(`${(START + i / RATE).toFixed(6)},${value(i)}`);
    await writeFile(`${dir}/road.csv`, rows.join("\n") + "\n");
  });

  test("spectrum of 12–14 s equals the spectrum of exactly those samples", async () => {
    const r = runQuiver(
      ["spectrum", "road.csv", "--start", "12", "--end", "14", "--block", "256", "--out", "s.json"],
      dir,
    );
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(await readFile(`${dir}/s.json`, "utf8"));
    // The reference: the same analysis on the samples with 12 <= t < 14 (indices 2048…4095).
    const data = new Float64Array(2 * RATE).map((_, k) => value(2 * RATE + k));
    const expected = await averagedSpectrum(
      { rate: RATE, startTime: 12, channels: [{ name: "acc", unit: "m/s^2", data }] },
      { block: 256 },
    );
    expect(json.columns[1].values).toEqual(Array.from(expected.columns[1].values));
    expect(json.metadata.slice_s).toEqual({ start: 12, end: 14 });
  });

  test("level and bands take it too (the tone fills the slice, so the level is its own)", async () => {
    const r = runQuiver(
      [
        "level",
        "road.csv",
        "--start",
        "12.5",
        "--end",
        "13.5",
        "--weighting",
        "Z",
        "--reference",
        "1e-6",
        "--time-weighting",
        "none",
        "--step",
        "0.5",
        "--out",
        "l.json",
      ],
      dir,
    );
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(await readFile(`${dir}/l.json`, "utf8"));
    // 1 rms tone + 0.1 amplitude (0.0707 rms) tone: 10·lg((1 + 0.005)/1e-12) dB (arithmetic).
    expect(Math.abs(json.metadata.summary[0].leq_db - 10 * Math.log10(1.005 / 1e-12))).toBeLessThan(
      0.01,
    );
    const b = runQuiver([
      "bands",
      "road.csv",
      "--start",
      "12",
      "--end",
      "14",
      "--reference",
      "1e-6",
      "--out",
      "b.json",
    ], dir);
    expect(b.code, b.stderr).toBe(0);
  });

  test("a slice outside the record is refused, naming both", () => {
    const r = runQuiver(["spectrum", "road.csv", "--start", "15", "--end", "20"], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /the slice 15–20 s reaches outside the record: the record spans 10–16 s/,
    );
    const e = runQuiver(["spectrum", "road.csv", "--start", "13", "--end", "12"], dir);
    expect(e.code).toBe(2);
    expect(e.stderr).toMatch(/the slice 13–12 s is empty/);
  });

  test("a slice shorter than one block is refused, naming both", () => {
    const r = runQuiver([
      "spectrum",
      "road.csv",
      "--start",
      "12",
      "--end",
      "12.1",
      "--block",
      "256",
    ], dir);
    // Refused from the header, before reading: an option the record cannot hold (exit 2).
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /--block 256 is longer than the record of 103 samples .*the largest is 103/,
    );
  });

  test("a plan's recording start/end reach every analysis of it, and the manifest", async () => {
    const plan = {
      quiver_plan: 1,
      title: "slice",
      recordings: { road: { file: "road.csv", start: 12, end: 14 } },
      analyses: [{ id: "psd", command: "spectrum", recording: "road", options: { block: 256 } }],
    };
    await writeFile(`${dir}/plan.json`, JSON.stringify(plan));
    const r = runQuiver(["run", `${dir}/plan.json`, "--out-dir", `${dir}/out`, "--jobs", "1"]);
    expect(r.code, r.stderr).toBe(0);
    const manifest = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    expect(manifest.steps[0].argv.join(" ")).toMatch(/--start 12 --end 14/);
    const psd = JSON.parse(await readFile(`${dir}/out/psd.json`, "utf8"));
    expect(psd.metadata.slice_s).toEqual({ start: 12, end: 14 });
  });
});
