import { describe, expect, test } from "vitest";
import { levelHistory } from "../../lib/acoustics/level_analysis.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { applyChannelSetup } from "../../lib/io/channel_setup.ts";
import { formatReference, levelUnit } from "../../lib/acoustics/levels.ts";

// ISO 1683:2015 reference values, typed here (from memory of the standard's table):
// sound pressure 20 µPa, acceleration 1 µm/s², velocity 1 nm/s, displacement 1 pm, force 1 µN.
const CASES: [string, number, number][] = [
  // unit as recorded, RMS in that unit, expected level in dB (analytic: 20·lg(rms/ref))
  ["Pa", 1, 20 * Math.log10(1 / 20e-6)], // 93.98 dB
  ["m/s^2", 1, 120], // 1 m/s² re 1 µm/s²
  ["g", 1, 20 * Math.log10(9.80665 / 1e-6)], // 139.83 dB; g from ISO 80000-3
  ["m/s", 1e-3, 120], // 1 mm/s re 1 nm/s
  ["mm/s", 1, 120], // the same, recorded in mm/s
  ["m", 1e-6, 120], // 1 µm re 1 pm
  ["µm", 1, 120],
  ["N", 1, 120], // 1 N re 1 µN
];

describe("levels re the ISO 1683 reference of each unit", () => {
  for (const [unit, rms, expected] of CASES) {
    test(`${rms} ${unit} rms reads ${expected.toFixed(2)} dB`, async () => {
      const rate = 8000;
      const rows = [`x [${unit}]`];
      for (let i = 0; i < 4 * rate; i++) {
        rows.push(String(rms * Math.SQRT2 * Math.sin(2 * Math.PI * 250 * i / rate)));
      }
      const rec = applyChannelSetup(parseCsvRecording(rows.join("\n"), { rate }), { channels: {} });
      const { summary } = await levelHistory(rec, {
        weighting: "Z",
        timeWeighting: "none",
        step: 0.5,
      });
      expect(Math.abs(summary[0].leq - expected)).toBeLessThan(0.01);
    });
  }
});

describe("references as an engineer writes them", () => {
  test("ISO 1683 references with SI prefixes; other units as plain numbers", () => {
    // ISO 1683:2015 reference values (from memory): 20 µPa, 1 µm/s², 1 nm/s, 1 pm, 1 µN.
    expect(levelUnit("A", 20e-6, "Pa")).toBe("dB(A) re 20 µPa");
    expect(levelUnit("Z", 1e-6, "m/s^2")).toBe("dB re 1 µm/s^2");
    expect(levelUnit("Z", 1e-9, "m/s")).toBe("dB re 1 nm/s");
    expect(levelUnit("Z", 1e-12, "m")).toBe("dB re 1 pm");
    expect(levelUnit("Z", 1e-6, "N")).toBe("dB re 1 µN");
    expect(formatReference(20e-6, "Pa/√Hz")).toBe("20 µPa/√Hz");
    // A user's own reference: the number as given, no prefix guessed for an unknown unit.
    expect(formatReference(0.5, "V")).toBe("0.5 V");
    expect(formatReference(2e-3, "FS")).toBe("0.002 FS");
  });
});
