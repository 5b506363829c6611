/**
 * `quiver calibrate` names the sensitivity the set-up held before beside the
 * new one, and the change in dB, so that a microphone that drifted (or a
 * wrong set-up) shows at once.
 */
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { sensitivityChange } from "../../cli/calibrate.ts";
import { runQuiver } from "../helpers/cli.ts";

// IEC 60942: a sound calibrator's nominal level, 94 dB re 20 µPa (1.0024 Pa rms) at 1 kHz.
const P = 20e-6 * 10 ** (94 / 20);
const RATE = 16384;

/** Two seconds of a clean calibrator tone in volts from a 50 mV/Pa microphone. */
function tone(): string {
  const rows = Array.from(
    { length: 2 * RATE },
    (_, i) => String(0.05 * P * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / RATE)),
  );
  return `mic [V]\n${rows.join("\n")}\n`;
}

describe("calibrate prints the old and the new sensitivity", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-calibrate-change-");
    await writeFile(`${dir}/cal.csv`, tone());
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  const calibrate = (setup: string) =>
    runQuiver([
      "calibrate",
      `${dir}/cal.csv`,
      "--rate",
      String(RATE),
      "--channel",
      "mic",
      "--setup",
      setup,
    ]);

  test("a set-up at 25 mV/Pa: the new 50 mV/Pa is +6.02 dB", async () => {
    await writeFile(
      `${dir}/old.json`,
      JSON.stringify({ channels: { mic: { unit: "Pa", sensitivity_mv_per_unit: 25 } } }),
    );
    const r = calibrate(`${dir}/old.json`);
    expect(r.code).toBe(0);
    // 20·lg(50/25) = 6.0206 dB (IEC 60027-3: level of a field quantity ratio).
    expect(r.stderr).toContain("mic: sensitivity was 25.0000 mV/Pa, now 50.0000 mV/Pa: +6.02 dB\n");
  });

  test("a set-up at 100 mV/Pa: the change is -6.02 dB", async () => {
    await writeFile(
      `${dir}/high.json`,
      JSON.stringify({ channels: { mic: { unit: "Pa", sensitivity_mv_per_unit: 100 } } }),
    );
    const r = calibrate(`${dir}/high.json`);
    expect(r.code).toBe(0);
    expect(r.stderr).toContain(
      "mic: sensitivity was 100.000 mV/Pa, now 50.0000 mV/Pa: -6.02 dB\n",
    );
  });

  test("no sensitivity before: says so", () => {
    const r = calibrate(`${dir}/new.json`); // no such file yet: a new set-up
    expect(r.code).toBe(0);
    expect(r.stderr).toContain(
      "mic: the set-up had no sensitivity for this channel; now 50.0000 mV/Pa\n",
    );
  });

  test("an old sensitivity per another unit gives no dB", () => {
    // 20·lg of mV/Pa over mV/(m/s^2) has no meaning: no number is printed for it.
    expect(sensitivityChange({ unit: "m/s^2", sensitivity_mv_per_unit: 10.2 }, 50)).toBe(
      "sensitivity was 10.2000 mV per m/s^2, not per Pa, so no change in dB is given; now 50.0000 mV/Pa",
    );
    // 20·lg(50/44.5) = 1.0122 dB.
    expect(sensitivityChange({ unit: "Pa", sensitivity_mv_per_unit: 44.5 }, 50)).toBe(
      "sensitivity was 44.5000 mV/Pa, now 50.0000 mV/Pa: +1.01 dB",
    );
  });
});
