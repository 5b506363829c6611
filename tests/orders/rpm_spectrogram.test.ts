import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { spectrogramAgainstRpm } from "../../lib/orders/rpm_spectrogram.ts";
import type { Recording } from "../../lib/io/recording.ts";
import type { Table } from "../../lib/io/table.ts";
import { iecA } from "../helpers/iec_weighting.ts";
import { linearProfile, orderResponse, ttlTacho } from "../helpers/run_up.ts";
import { runQuiver } from "../helpers/cli.ts";

const col = (t: Table, i: number) => t.columns[i].values;

/** Σ PSD·df over the lines within ±halfWidth Hz of f in the frame of `rpm`. */
function energyNear(t: Table, rpm: number, f: number, halfWidth: number): number {
  const [r, hz, psd] = [col(t, 0), col(t, 1), col(t, 2)];
  const df = hz[1] - hz[0];
  let sum = 0;
  for (let i = 0; i < r.length; i++) {
    if (r[i] === rpm && Math.abs(hz[i] - f) <= halfWidth) sum += psd[i] * df;
  }
  return sum;
}

describe("spectrogram against rpm", () => {
  test("a cabin microphone's order 2 of 0.1 Pa rms reads 20·lg(0.1/20 µPa) + A(2·rpm/60) within 0.3 dB", async () => {
    // Analytic case (our own): linear run-up 1500 → 4500 rpm in 12 s, 2-pulse TTL tacho,
    // order 2 at a constant 0.1 Pa rms. A-weighting from IEC 61672-1's formula typed into
    // tests/helpers/iec_weighting.ts; 20 µPa is the ISO 1683 reference of sound pressure.
    const rate = 8192, seconds = 12;
    const profile = linearProfile(1500, 4500, seconds);
    const rec: Recording = {
      rate,
      startTime: 0,
      channels: [
        { name: "tacho", unit: "V", data: ttlTacho(profile, rate, seconds, 2) },
        {
          name: "cabin_mic",
          unit: "Pa",
          data: orderResponse(profile, rate, seconds, [{ order: 2, rms: () => 0.1 }]),
        },
      ],
    };
    const table = await spectrogramAgainstRpm(rec, {
      tacho: "tacho",
      ppr: 2,
      rpmStep: 250,
      block: 2048, // 0.25 s: the order sweeps 2.1 Hz (about half a line) during a frame
      weighting: "A",
    });
    expect(table.columns.map((c) => c.name)).toEqual(["rpm", "frequency_hz", "cabin_mic"]);
    const steps = [...new Set(col(table, 0))];
    expect(steps[0]).toBe(1750); // 1500 itself has no whole frame before the record starts
    expect(steps.length).toBeGreaterThan(8);
    for (const r of steps) {
      const f = (2 * r) / 60;
      // ±3 lines (12 Hz) hold the Hann main lobe and the sweep.
      const level = 10 * Math.log10(energyNear(table, r, f, 12) / (20e-6) ** 2);
      const expected = 20 * Math.log10(0.1 / 20e-6) + iecA(f);
      expect(Math.abs(level - expected), `at ${r} rpm (${f.toFixed(1)} Hz)`).toBeLessThan(0.3);
    }
  });

  test("frames sit where the speed passes each step, on a record that starts at 5 s", async () => {
    // rpm channel 1000 → 4000 in 12 s (250 rpm/s); order 4 of 1 V rms switched on at
    // 2500 rpm (6 s after the first sample). A frame of 2048 samples at 4096 Hz spans
    // ±62.5 rpm around its step, so 2400 rpm must see nothing and 2600 rpm all of it.
    const rate = 4096, seconds = 12;
    const profile = linearProfile(1000, 4000, seconds);
    const tone = orderResponse(profile, rate, seconds, [{ order: 4, rms: () => 1 }]);
    const rpm = new Float64Array(rate * seconds).map((_, i) => profile.rpm(i / rate));
    const x = tone.map((v, i) => (profile.rpm(i / rate) >= 2500 ? v : 0));
    const table = await spectrogramAgainstRpm({
      rate,
      startTime: 5,
      channels: [{ name: "speed", unit: "rpm", data: rpm }, { name: "x", unit: "V", data: x }],
    }, { rpmChannel: "speed", rpmStep: 100, block: 2048, rpmMin: 1500, rpmMax: 3500 });
    expect(table.columns.map((c) => c.name)).toEqual(["rpm", "frequency_hz", "x"]);
    const at = (r: number) => energyNear(table, r, (4 * r) / 60, 16);
    expect(at(2400)).toBeLessThan(1e-20);
    expect(Math.abs(10 * Math.log10(at(2600)))).toBeLessThan(0.3);
    expect(Math.abs(10 * Math.log10(at(3500)))).toBeLessThan(0.3);
  });

  test("a run-down gives rising rpm rows with the order at 2·rpm/60", async () => {
    const rate = 4096, seconds = 10;
    const profile = linearProfile(4000, 1000, seconds);
    const rec: Recording = {
      rate,
      startTime: 0,
      channels: [
        { name: "tacho", unit: "V", data: ttlTacho(profile, rate, seconds, 1) },
        {
          name: "x",
          unit: "m/s^2",
          data: orderResponse(profile, rate, seconds, [{ order: 2, rms: () => 1 }]),
        },
      ],
    };
    const table = await spectrogramAgainstRpm(rec, {
      tacho: "tacho",
      ppr: 1,
      rpmStep: 500,
      block: 1024,
      kind: "rms",
    });
    const [r, f, v] = [col(table, 0), col(table, 1), col(table, 2)];
    const steps = [...new Set(r)];
    expect(steps).toEqual([1500, 2000, 2500, 3000, 3500]);
    for (const s of steps) {
      let best = -1;
      for (let i = 0; i < r.length; i++) if (r[i] === s && (best < 0 || v[i] > v[best])) best = i;
      expect(Math.abs(f[best] - (2 * s) / 60), `peak line at ${s} rpm`).toBeLessThanOrEqual(4);
    }
  });

  test("an rpm range the recording does not reach is refused, naming both", async () => {
    const rpm = new Float64Array(4096 * 4).map((_, i) => 1000 + i / 16);
    await expect(spectrogramAgainstRpm({
      rate: 4096,
      startTime: 0,
      channels: [{ name: "n", unit: "rpm", data: rpm }, {
        name: "x",
        unit: "V",
        data: new Float64Array(rpm.length),
      }],
    }, { rpmChannel: "n", rpmMax: 5000, rpmStep: 100 })).rejects.toThrow(
      /spans 1000\.0–2023\.9 rpm, which does not cover the requested 1000–5000 rpm/,
    );
  });
});

describe("quiver spectrogram --against rpm", () => {
  test("writes rpm, frequency_hz and the channel in dB(A); speed options need --against rpm", async () => {
    const dir = await mkdtemp("/tmp/quiver-rpmspec-");
    const rate = 4096, seconds = 8;
    const profile = linearProfile(1200, 3600, seconds);
    const mic = orderResponse(profile, rate, seconds, [{ order: 2, rms: () => 0.1 }]);
    const lines = ["time_s,n [rpm],mic [Pa]"];
    for (let i = 0; i < rate * seconds; i++) {
      lines.push(`${i / rate},${profile.rpm(i / rate)},${mic[i]}`);
    }
    await writeFile(`${dir}/runup.csv`, lines.join("\n") + "\n");
    const ok = runQuiver([
      "spectrogram",
      `${dir}/runup.csv`,
      "--against",
      "rpm",
      "--rpm-channel",
      "n",
      "--rpm-step",
      "400",
      "--block",
      "1024",
      "--weighting",
      "A",
      "--db",
      "--orders",
      "2,4",
      "--out",
      `${dir}/map.csv`,
    ]);
    expect(ok.stderr).toMatch(/spectrogram against rpm: 1 channel\(s\)/);
    expect(ok.code).toBe(0);
    const text = await readFile(`${dir}/map.csv`, "utf8");
    expect(text.split("\n")[0]).toBe("rpm [rpm],frequency_hz,mic [dB(A) re 20 µPa/√Hz]");
    const meta = JSON.parse(await readFile(`${dir}/map.csv.meta.json`, "utf8"));
    expect(meta.metadata.against).toBe("rpm");
    expect(meta.metadata.order_lines).toEqual([2, 4]);
    expect(meta.metadata.speed_source).toEqual({ rpm_channel: "n" });

    const timeWithTacho = runQuiver([
      "spectrogram",
      `${dir}/runup.csv`,
      "--rpm-channel",
      "n",
      "--out",
      `${dir}/t.csv`,
    ]);
    expect(timeWithTacho.code).toBe(2);
    expect(timeWithTacho.stderr).toMatch(/apply to --against rpm only/);
    const rpmWithout = runQuiver([
      "spectrogram",
      `${dir}/runup.csv`,
      "--against",
      "rpm",
      "--out",
      `${dir}/r.csv`,
    ]);
    expect(rpmWithout.code).toBe(2);
    expect(rpmWithout.stderr).toMatch(
      /--against rpm needs --tacho \(with --ppr\) or --rpm-channel/,
    );
  });
});
