import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { baseUnit } from "../../lib/io/units.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { applyChannelSetup } from "../../lib/io/channel_setup.ts";
import { readRecordingFile } from "../../lib/io/read_recording.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { gaussianNoise } from "../helpers/random.ts";

describe("units are converted to their SI base unit on reading", () => {
  // Expected factors typed from the sources, not read from the code:
  // g = 9.80665 m/s² (ISO 80000-3:2019, 3-9.1); SI prefixes k = 1e3, m = 1e-3,
  // µ = 1e-6, n = 1e-9 (SI Brochure, 9th ed., Table 7).
  const cases: [string, string, number][] = [
    ["g", "m/s^2", 9.80665],
    ["mm/s^2", "m/s^2", 1e-3],
    ["m/s²", "m/s^2", 1],
    ["mm/s", "m/s", 1e-3],
    ["µm/s", "m/s", 1e-6],
    ["mm", "m", 1e-3],
    ["um", "m", 1e-6],
    ["µm", "m", 1e-6],
    ["μm", "m", 1e-6], // Greek mu
    ["nm", "m", 1e-9],
    ["kN", "N", 1e3],
    ["mN", "N", 1e-3],
    ["kPa", "Pa", 1e3],
    ["mV", "V", 1e-3],
    ["µV", "V", 1e-6],
  ];
  for (const [unit, base, factor] of cases) {
    test(`[${unit}] → [${base}] × ${factor}`, () => {
      expect(baseUnit(unit)).toEqual({ unit: base, factor });
      const rec = parseCsvRecording(`x [${unit}]\n1\n-2\n`, { rate: 10 });
      const read = applyChannelSetup(rec, { channels: {} });
      expect(read.channels[0].unit).toBe(base);
      assertClose(read.channels[0].data, [factor, -2 * factor], { relative: 1e-15, absolute: 0 });
    });
  }

  test("units quiver does not know are kept as they are", () => {
    expect(baseUnit("rpm")).toBeUndefined();
    expect(baseUnit("furlong")).toBeUndefined();
  });

  test("a set-up in g with a sensitivity in mV/g gives m/s^2", () => {
    // 100 mV/g accelerometer, 0.5 V read: 5 g = 49.033 m/s².
    const rec = parseCsvRecording("acc [V]\n0.5\n", { rate: 10 });
    const out = applyChannelSetup(rec, {
      channels: { acc: { unit: "g", sensitivity_mv_per_unit: 100 } },
    });
    expect(out.channels[0].unit).toBe("m/s^2");
    assertClose(out.channels[0].data[0], 5 * 9.80665, { relative: 1e-14, absolute: 0 }, "acc");
  });

  test("a file in [g] with a set-up saying m/s^2 is the same quantity, converted", () => {
    const rec = parseCsvRecording("acc [g]\n2\n", { rate: 10 });
    const out = applyChannelSetup(rec, { channels: { acc: { unit: "m/s^2" } } });
    expect(out.channels[0].unit).toBe("m/s^2");
    assertClose(out.channels[0].data[0], 2 * 9.80665, { relative: 1e-14, absolute: 0 }, "acc");
  });

  test("a file in [g] with a set-up saying Pa is refused", () => {
    const rec = parseCsvRecording("acc [g]\n2\n", { rate: 10 });
    expect(() => applyChannelSetup(rec, { channels: { acc: { unit: "Pa" } } })).toThrow(
      /contradicts/,
    );
  });

  test("the chunked and whole-file readers convert the same way", async () => {
    const dir = await mkdtemp("/tmp/quiver-units-");
    await writeFile(`${dir}/r.csv`, "time_s,acc [g],disp [µm]\n0,1,3\n0.001,2,4\n");
    const rec = await readRecordingFile(`${dir}/r.csv`);
    expect(rec.channels.map((c) => c.unit)).toEqual(["m/s^2", "m"]);
    assertClose(rec.channels[1].data, [3e-6, 4e-6], { relative: 1e-15, absolute: 0 }, "disp");
  });
});

describe("frf --form mobility on an accelerometer in g", () => {
  test("gives (m/s)/N with |H| = 9.80665·c/(2πf) for a response of c g per N", async () => {
    // Analytic: a response a(t) = c·F(t) in g has accelerance c·g (m/s²)/N at every
    // frequency; mobility = accelerance/(jω) (Ewins, Modal Testing, 2nd ed., 1.3), so
    // |mobility| = c·9.80665/(2πf) (m/s)/N and its phase is −90°.
    const rate = 1024;
    const force = gaussianNoise(41, 64 * 1024);
    const c = 0.2;
    const acc = force.map((v) => c * v);
    const dir = await mkdtemp("/tmp/quiver-units-frf-");
    await writeFile(
      `${dir}/shake.csv`,
      recordingCsv({
        rate,
        startTime: 0,
        channels: [
          { name: "force", unit: "kN", data: force.map((v) => v / 1000) },
          { name: "acc", unit: "g", data: acc },
        ],
      }),
    );
    const r = runQuiver([
      "frf",
      "shake.csv",
      "--rate",
      String(rate),
      "--input",
      "force",
      "--outputs",
      "acc",
      "--block",
      "1024",
      "--form",
      "mobility",
      "--out",
      "m.csv",
    ], dir);
    expect(r.code, r.stderr).toBe(0);
    const lines = (await readFile(`${dir}/m.csv`, "utf8")).trim().split("\n");
    expect(lines[0]).toContain("acc_mag [(m/s)/N]");
    const header = lines[0].split(",");
    const fi = header.indexOf("frequency_hz");
    const mi = header.findIndex((h) => h.startsWith("acc_mag"));
    const pi = header.findIndex((h) => h.startsWith("acc_phase_deg"));
    for (const line of lines.slice(1)) {
      const cells = line.split(",").map(Number);
      const f = cells[fi];
      if (f < 5) continue;
      assertClose(
        cells[mi],
        (c * 9.80665) / (2 * Math.PI * f),
        { relative: 1e-9, absolute: 0 },
        `|H| at ${f} Hz`,
      );
      assertClose(cells[pi], -90, { relative: 0, absolute: 1e-6 }, `phase at ${f} Hz`);
    }
  });
});
