import { describe, expect, test } from "vitest";
import { levelHistory } from "../../lib/acoustics/level_analysis.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { applyChannelSetup } from "../../lib/io/channel_setup.ts";
import { formatReference, levelUnit } from "../../lib/acoustics/levels.ts";
import { iecA } from "../helpers/iec_weighting.ts";
import { assertClose } from "../helpers/assert_close.ts";

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

describe("Leq and exceedance levels of a level that changes", () => {
  const rate = 8000;
  /** 250 Hz tone at the given rms per 0.1 s step (25 whole cycles per step). */
  function steps(rmsOfStep: (k: number) => number, count: number) {
    const n = Math.round(0.1 * rate);
    const data = new Float64Array(count * n).map((_, i) =>
      rmsOfStep(Math.floor(i / n)) * Math.SQRT2 * Math.sin(2 * Math.PI * 250 * i / rate)
    );
    return { rate, startTime: 0, channels: [{ name: "mic", unit: "Pa", data }] };
  }

  test("Leq of 2 s at 1 Pa then 2 s at 0.1 Pa is the energy mean, 91.01 dB", async () => {
    // Definition of Leq (IEC 61672-1:2013, 3.8): 10·lg(mean of p²/p0²) =
    // 10·lg(((1 + 0.01)/2)/(20 µPa)²) = 91.01 dB; the mean of the dB (83.98) is wrong.
    const { summary } = await levelHistory(steps((k) => (k < 20 ? 1 : 0.1), 40), {
      weighting: "Z",
      timeWeighting: "none",
    });
    const expected = 10 * Math.log10(((1 + 0.01) / 2) / (20e-6) ** 2);
    expect(Math.abs(expected - 91.01)).toBeLessThan(0.005);
    expect(Math.abs(summary[0].leq - expected)).toBeLessThan(0.01);
  });

  test("a level rising evenly from 60 to 100 dB: L10 = 96, L50 = 80, L90 = 64 dB", async () => {
    // L_N is the level exceeded N % of the time (common practice). 100 steps of
    // 60 + 40·k/99 dB: the 90th percentile of the readings, interpolated, is
    // 60 + 40·(0.9·99)/99 = 96 dB; the 10th, 64 dB.
    const { summary } = await levelHistory(
      steps((k) => 20e-6 * 10 ** ((60 + (40 * k) / 99) / 20), 100),
      { weighting: "Z", timeWeighting: "none", step: 0.1 },
    );
    expect(Math.abs(summary[0].l10 - 96)).toBeLessThan(0.01);
    expect(Math.abs(summary[0].l50 - 80)).toBeLessThan(0.01);
    expect(Math.abs(summary[0].l90 - 64)).toBeLessThan(0.01);
  });
});

describe("level's default frequency weighting follows each channel's unit", () => {
  // One 100 Hz tone of 1 rms in a microphone (Pa) and an accelerometer (recorded in g).
  const rate = 48000;
  const tone = new Float64Array(rate).map((_, i) =>
    Math.SQRT2 * Math.sin(2 * Math.PI * 100 * i / rate)
  );
  const g = 9.80665; // standard gravity, ISO 80000-3
  const rec = applyChannelSetup(
    parseCsvRecording(
      ["cabin_mic [Pa],seat_rail [g]", ...Array.from(tone, (v) => `${v},${v / g}`)].join("\n"),
      { rate },
    ),
    { channels: {} },
  );
  const pa = 20 * Math.log10(1 / 20e-6); // 1 Pa rms re 20 µPa (ISO 1683)
  const acc = 120; // 1 m/s^2 rms re 1 µm/s^2 (ISO 1683)

  test("A for the Pa channel, none (Z) for the m/s^2 channel; the metadata says which", async () => {
    const { summary, table } = await levelHistory(rec, { timeWeighting: "none", step: 0.1 });
    // IEC 61672-1 Annex E: A(100 Hz) = −19.1 dB. Always-A would read the
    // accelerometer 19 dB low; always-Z would leave the microphone unweighted.
    assertClose(summary[0].leq, pa + iecA(100), { absolute: 0.02, relative: 0 }, "mic");
    assertClose(summary[1].leq, acc, { absolute: 1e-6, relative: 0 }, "accelerometer");
    expect(summary.map((s) => [s.weighting, s.weightingFrom])).toEqual([["A", "unit"], [
      "Z",
      "unit",
    ]]);
    expect(summary.map((s) => s.unit)).toEqual(["dB(A) re 20 µPa", "dB re 1 µm/s^2"]);
    expect(table.metadata.weighting).toBe("per channel");
    expect(table.metadata.weighting_from).toBe("channel unit (A for Pa, Z otherwise)");
    const perChannel = (table.metadata.summary as readonly { weighting?: string }[]).map((s) =>
      s.weighting
    );
    expect(perChannel).toEqual(["A", "Z"]);
  });

  test("a weighting the caller names wins over the unit's", async () => {
    const { summary, table } = await levelHistory(rec, {
      weighting: "A",
      timeWeighting: "none",
      step: 0.1,
    });
    assertClose(summary[1].leq, acc + iecA(100), { absolute: 0.02, relative: 0 }, "A on m/s^2");
    expect(summary.map((s) => s.weightingFrom)).toEqual(["option", "option"]);
    expect(table.metadata.weighting).toBe("A");
    const z = await levelHistory(rec, { weighting: "Z", timeWeighting: "none", step: 0.1 });
    assertClose(z.summary[0].leq, pa, { absolute: 1e-6, relative: 0 }, "Z on Pa");
  });
});
