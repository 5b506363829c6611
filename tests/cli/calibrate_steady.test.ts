import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { gaussianNoise } from "../helpers/random.ts";

// IEC 60942: a sound calibrator's nominal level, 94 dB re 20 µPa (1.0024 Pa rms) at 1 kHz.
const P = 20e-6 * 10 ** (94 / 20);
const RATE = 16384;

/** A calibrator tone in volts from a 50 mV/Pa microphone, `gain(t)` on its amplitude. */
function calibratorCsv(seconds: number, gain: (t: number) => number): string {
  const noise = gaussianNoise(12, seconds * RATE);
  const rows = Array.from({ length: seconds * RATE }, (_, i) =>
    String(
      gain(i / RATE) * 0.05 * P * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / RATE) +
        1e-5 * noise[i],
    ));
  return `mic [V]\n${rows.join("\n")}\n`;
}

describe("quiver calibrate on an unsteady calibrator tone", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-calibrate-");
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  test("a dropout is left out with a warning; the set-up gets 50.0 mV/Pa", async () => {
    await writeFile(`${dir}/drop.csv`, calibratorCsv(6, (t) => (t >= 2.5 && t < 3 ? 0 : 1)));
    const r = runQuiver([
      "calibrate",
      `${dir}/drop.csv`,
      "--rate",
      String(RATE),
      "--channel",
      "mic",
      "--out",
      `${dir}/drop.json`,
    ]);
    expect(r.code).toBe(0);
    // Frames of round(0.1 × 16384) = 1638 samples: the silence (samples 40960 to 49151) makes
    // frames 25 to 29 unsteady, 40950/16384 = 2.4994 s to 49140/16384 = 2.9993 s.
    expect(r.stderr).toMatch(/warning: the calibrator tone was not steady .* 2\.499–2\.999 s/);
    expect(r.stderr).toMatch(/over 5\.3 s of steady tone/);
    const s = JSON.parse(await readFile(`${dir}/drop.json`, "utf8")).channels.mic;
    expect(Math.abs(s.sensitivity_mv_per_unit / 50 - 1)).toBeLessThan(0.001);
  });

  test("a level step halfway is refused (exit 1) and the set-up is not written", async () => {
    await writeFile(`${dir}/step.csv`, calibratorCsv(6, (t) => (t < 3 ? 1 : 2)));
    await writeFile(`${dir}/keep.json`, '{"channels": {}}\n');
    const r = runQuiver([
      "calibrate",
      `${dir}/step.csv`,
      "--rate",
      String(RATE),
      "--channel",
      "mic",
      "--setup",
      `${dir}/keep.json`,
    ]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/the calibrator tone is not steady/);
    expect(await readFile(`${dir}/keep.json`, "utf8")).toBe('{"channels": {}}\n');
  });
});
