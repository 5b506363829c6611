import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { iecA } from "../helpers/iec_weighting.ts";
import { encodeWav } from "../../lib/io/wav.ts";
import { runQuiver } from "../helpers/cli.ts";
import { gaussianNoise } from "../helpers/random.ts";

const level = (rms: number) => 20 * Math.log10(rms / 20e-6); // re 20 µPa (ISO 1683)

describe("quiver bands, level and calibrate", () => {
  let dir: string;
  const RATE = 16384;
  const TONES = [{ f: 100, rms: 0.4 }, { f: 1000, rms: 0.1 }, { f: 4000, rms: 0.05 }];
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-acoustics-");
    // Our synthesised cabin recording: three tones over a low broadband floor.
    const noise = gaussianNoise(5, 8 * RATE);
    const rows = Array.from({ length: 8 * RATE }, (_, i) => {
      const t = i / RATE;
      const p = TONES.reduce((s, tone) =>
        s + tone.rms * Math.SQRT2 * Math.sin(2 * Math.PI * tone.f * t), 0) +
        1e-4 * noise[i];
      return String(p);
    });
    await writeFile(`${dir}/cabin.csv`, `driver_ear [Pa]\n${rows.join("\n")}\n`);
  });

  test("bands --fraction 3 --weighting A reads each tone within 0.2 dB of its level plus A", async () => {
    const r = runQuiver([
      "bands",
      `${dir}/cabin.csv`,
      "--rate",
      String(RATE),
      "--fraction",
      "3",
      "--weighting",
      "A",
      "--out",
      `${dir}/bands.json`,
    ]);
    expect(r.code).toBe(0);
    const json = JSON.parse(await readFile(`${dir}/bands.json`, "utf8"));
    const nominal = json.columns.find((c: { name: string }) => c.name === "nominal_hz")
      .values as number[];
    const levels = json.columns.find((c: { name: string }) => c.name === "driver_ear")
      .values as number[];
    let total = 0;
    for (const tone of TONES) {
      // IEC 61672-1 A-weighting at the tone frequency.
      const expected = level(tone.rms) + iecA(tone.f);
      total += 10 ** (expected / 10);
      expect(Math.abs(levels[nominal.indexOf(tone.f)] - expected), `${tone.f} Hz`).toBeLessThan(
        0.2,
      );
    }
    expect(Math.abs(json.metadata.overall[0].level_db - 10 * Math.log10(total))).toBeLessThan(0.2);
    expect(json.columns.find((c: { name: string }) => c.name === "driver_ear").unit).toBe(
      "dB(A) re 20 µPa",
    );
    expect(r.stderr).toMatch(/driver_ear: overall \d+\.\d+ dB\(A\)/);
    // The range the rule chose, said: 20 Hz up to the last band wholly below 8192 Hz.
    expect(r.stderr).toMatch(/bands 20 Hz to 6300 Hz \(nominal\)/);
    expect(nominal[0]).toBe(20);
    // The block --help states: 5 lines in the 20 Hz band (width 4.63 Hz, IEC 61260-1
    // formulas 4, 5) need 16384/0.926 → 32768, at most a quarter of 8·16384 samples.
    expect(json.metadata.block).toBe(32768);
    const help = runQuiver(["bands", "--help"]);
    expect(help.stdout.replace(/\s+/g, " ")).toMatch(
      /the power of two that gives the lowest band 5 lines, at most a quarter of the record/,
    );
  });

  test("bands refuses a unit without a standard reference", async () => {
    await writeFile(
      `${dir}/volts.csv`,
      "x [V]\n" + Array.from({ length: 4096 }, (_, i) => Math.sin(i)).join("\n") + "\n",
    );
    const r = runQuiver(["bands", `${dir}/volts.csv`, "--rate", "4096"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no standard level reference for unit \[V\]/);
  });

  test("level gives Leq and the statistics of a 94 dB tone at 48 kHz", async () => {
    const p = 20e-6 * 10 ** (94 / 20);
    const data = new Float64Array(3 * 48000).map((_, i) =>
      p * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000)
    );
    await writeFile(
      `${dir}/tone.wav`,
      encodeWav({
        rate: 48000,
        startTime: 0,
        channels: [{
          name: "ch1",
          unit: "FS",
          data: data.map((v) => v / 4),
        }],
      }, "float32"),
    );
    await writeFile(
      `${dir}/setup.json`,
      JSON.stringify({
        channels: {
          ch1: { name: "mic", unit: "Pa", full_scale_volts: 4, sensitivity_mv_per_unit: 1000 },
        },
      }),
    );
    const r = runQuiver([
      "level",
      `${dir}/tone.wav`,
      "--setup",
      `${dir}/setup.json`,
      "--format",
      "json",
    ]);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout).metadata.summary[0];
    expect(Math.abs(s.leq_db - 94)).toBeLessThan(0.05); // A-weighting is 0 dB at 1 kHz (IEC 61672-1)
    expect(Math.abs(s.lmax_db - 94)).toBeLessThan(0.1);
    expect(Math.abs(s.l90_db - 94)).toBeLessThan(0.1);
    expect(r.stderr).toMatch(/mic \[dB\(A\) re 20 µPa\]: Leq 94\.0/);
  });

  test("level refuses A-weighting below the rate the digital filter needs", () => {
    const r = runQuiver(["level", `${dir}/cabin.csv`, "--rate", String(RATE)]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/needs a sample rate above/);
  });

  test("calibrate recovers the microphone sensitivity within 0.1 % and writes the set-up", async () => {
    // A 94 dB calibrator tone (1.0024 Pa rms, common practice) seen by a 47.3 mV/Pa microphone, in volts.
    const p = 20e-6 * 10 ** (94 / 20);
    const noise = gaussianNoise(11, 5 * 25600);
    const rows = Array.from(
      { length: 5 * 25600 },
      (_, i) =>
        String(
          0.0473 * p * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 25600) + 2e-5 * noise[i] +
            0.001,
        ),
    );
    await writeFile(`${dir}/cal.csv`, `front_mic [V]\n${rows.join("\n")}\n`);
    const r = runQuiver([
      "calibrate",
      `${dir}/cal.csv`,
      "--rate",
      "25600",
      "--channel",
      "front_mic",
      "--setup",
      `${dir}/mics.json`,
    ]);
    expect(r.code).toBe(0);
    const setup = JSON.parse(await readFile(`${dir}/mics.json`, "utf8"));
    const s = setup.channels.front_mic.sensitivity_mv_per_unit;
    expect(Math.abs(s / 47.3 - 1)).toBeLessThan(0.001);
    expect(setup.channels.front_mic.unit).toBe("Pa");
    // Read back through the set-up, the 1 kHz third-octave holds the calibrator's 94 dB.
    const b = runQuiver([
      "bands",
      `${dir}/cal.csv`,
      "--rate",
      "25600",
      "--setup",
      `${dir}/mics.json`,
      "--format",
      "json",
    ]);
    expect(b.code).toBe(0);
    const json = JSON.parse(b.stdout);
    const nominal = json.columns[1].values as number[];
    expect(Math.abs(json.columns[4].values[nominal.indexOf(1000)] - 94)).toBeLessThan(0.1);
  });
});
