import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { calibrateMicrophone } from "../../lib/acoustics/calibration.ts";
import { runQuiver } from "../helpers/cli.ts";

// 114 dB re 20 µPa is 20e-6 · 10^(114/20) = 10.024 Pa rms (the definition of sound pressure
// level, IEC 61672-1:2013, 3.3); a 50 mV/Pa microphone gives 0.50119 V rms.
const RATE = 8192;
const P114 = 20e-6 * 10 ** (114 / 20);

function toneCsv(seconds: number): string {
  const rows = Array.from(
    { length: seconds * RATE },
    (_, i) => String(0.05 * P114 * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / RATE)),
  );
  return `mic [V]\n${rows.join("\n")}\n`;
}

describe("quiver calibrate --level: checked against a sensible range at the boundary", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-calibrate-level-");
    await writeFile(`${dir}/tone.csv`, toneCsv(2));
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  test("--level 1e308 and 201 are refused (exit 2) with the range, not a set-up error", () => {
    for (const level of ["1e308", "201", "0"]) {
      const r = runQuiver([
        "calibrate",
        `${dir}/tone.csv`,
        "--rate",
        String(RATE),
        "--channel",
        "mic",
        `--level=${level}`,
      ]);
      expect(r.code, r.stderr).toBe(2);
      // Common practice: calibrators give 94 or 114 dB, pistonphones about 124 dB.
      expect(r.stderr).toContain(
        "--level: must lie above 0 dB and at most 200 dB re 20 uPa",
      );
      expect(r.stderr).not.toContain("sensitivity_mv_per_unit");
    }
  });

  test("--level 114 (inside the range) gives 50 mV/Pa", async () => {
    const r = runQuiver([
      "calibrate",
      `${dir}/tone.csv`,
      "--rate",
      String(RATE),
      "--channel",
      "mic",
      "--level",
      "114",
      "--out",
      `${dir}/s.json`,
    ]);
    expect(r.code, r.stderr).toBe(0);
    const s = JSON.parse(await readFile(`${dir}/s.json`, "utf8")).channels.mic;
    expect(Math.abs(s.sensitivity_mv_per_unit / 50 - 1)).toBeLessThan(1e-3);
  });

  test("the library refuses a level above 200 dB (RangeError)", async () => {
    const rec = {
      rate: RATE,
      startTime: 0,
      channels: [{ name: "mic", unit: "V", data: new Float64Array(RATE) }],
    };
    await expect(calibrateMicrophone(rec, 0, { levelDb: 1e308 })).rejects.toThrow(
      /calibrator level must lie above 0 dB and at most 200 dB re 20 µPa, got 1e\+308/,
    );
  });
});
