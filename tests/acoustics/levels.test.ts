import { describe, expect, test } from "vitest";
import { levelHistory } from "../../lib/acoustics/level_analysis.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { applyChannelSetup } from "../../lib/io/channel_setup.ts";

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
