/**
 * Tones against rpm: a synthetic run-up with an order of known amplitude
 * over white noise of known density gives TNR = 10·lg(A² / (N0·Δf_c(f)))
 * along the rpm steps (ECMA-418-1's definition, analytic), at f = k·rpm/60.
 */
import { describe, expect, test } from "vitest";
import { assertClose } from "../helpers/assert_close.ts";
import { linearProfile, orderResponse } from "../helpers/run_up.ts";
import { tonesAnalysis } from "../../lib/quality/tones_analysis.ts";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { mkdtemp, rm, writeFile } from "node:fs/promises";

// ECMA-418-1, from memory: Δf_c = 25 + 75·(1 + 1.4·(f/1000)²)^0.69 Hz.
const bandwidth = (f: number) => 25 + 75 * (1 + 1.4 * (f / 1000) ** 2) ** 0.69;

describe("tones against rpm", () => {
  test("order 16 of 0.05 Pa over noise: the expected TNR at each rpm step", async () => {
    const rate = 4096, seconds = 60, sigma = 0.02, a = 0.05;
    const profile = linearProfile(600, 1200, seconds);
    const mic = orderResponse(profile, rate, seconds, [{ order: 16, rms: () => a }], sigma, 41);
    const rpm = new Float64Array(mic.length).map((_, i) => profile.rpm(i / rate));
    const { table } = await tonesAnalysis({
      rate,
      startTime: 0,
      channels: [{ name: "n", unit: "rpm", data: rpm }, { name: "mic", unit: "Pa", data: mic }],
    }, {
      against: "rpm",
      rpmChannel: "n",
      orders: [16],
      rpmStep: 50,
      block: 1024,
      frames: 8,
    });
    const col = (n: string) => table.columns.find((c) => c.name === n)!.values as Float64Array;
    const steps = col("rpm"), tnr = col("tnr_db"), f = col("frequency_hz");
    expect(steps.length).toBeGreaterThan(8);
    // White noise of variance σ² has the one-sided density 2σ²/fs (Bendat & Piersol, eq. 5.180).
    const n0 = 2 * sigma * sigma / rate;
    let sum = 0;
    for (let i = 0; i < steps.length; i++) {
      expect(f[i]).toBeCloseTo(16 * steps[i] / 60, 9);
      const expected = 10 * Math.log10(a * a / (n0 * bandwidth(f[i])));
      // One step's noise estimate rests on ~8 segments of ~25 lines: about ±0.5 dB.
      assertClose(tnr[i], expected, { relative: 0, absolute: 1.5 }, `TNR at ${steps[i]} rpm`);
      sum += tnr[i] - expected;
    }
    // Over the steps the scatter averages out: no bias beyond 0.3 dB.
    assertClose(sum / steps.length, 0, { relative: 0, absolute: 0.3 }, "mean error");
    expect(table.columns.find((c) => c.name === "channel")!.values[0]).toBe("mic");
  });

  test("a fast run-up (order 16 sweeping 113 Hz/s, over ~4 lines a frame): the lobe widens with it", async () => {
    const rate = 8192, seconds = 12, sigma = 0.005, a = 0.02;
    const profile = linearProfile(900, 6000, seconds);
    const mic = orderResponse(profile, rate, seconds, [{ order: 16, rms: () => a }], sigma, 42);
    const rpm = new Float64Array(mic.length).map((_, i) => profile.rpm(i / rate));
    const { table } = await tonesAnalysis({
      rate,
      startTime: 0,
      channels: [{ name: "n", unit: "rpm", data: rpm }, { name: "mic", unit: "Pa", data: mic }],
    }, { against: "rpm", rpmChannel: "n", orders: [16], rpmStep: 250, block: 1024 });
    const col = (n: string) => table.columns.find((c) => c.name === n)!.values as Float64Array;
    const tnr = col("tnr_db"), f = col("frequency_hz"), level = col("level_db");
    const n0 = 2 * sigma * sigma / rate; // Bendat & Piersol, eq. 5.180
    let sum = 0;
    for (let i = 0; i < tnr.length; i++) {
      const expected = 10 * Math.log10(a * a / (n0 * bandwidth(f[i])));
      // One frame of 4 segments over ~13 lines of band at the low end: about ±1 dB a step.
      assertClose(tnr[i], expected, { relative: 0, absolute: 3 }, `TNR at ${f[i]} Hz`);
      // The tone's whole power is kept: 0.02 Pa re 20 µPa, 60 dB.
      assertClose(level[i], 20 * Math.log10(a / 20e-6), { relative: 0, absolute: 0.3 }, "level");
      sum += tnr[i] - expected;
    }
    assertClose(sum / tnr.length, 0, { relative: 0, absolute: 0.75 }, "mean error");
  });

  test("a CSV read in the reader's chunks gives the numbers of the recording in memory", async () => {
    const rate = 4096, seconds = 20;
    const profile = linearProfile(900, 1800, seconds);
    const mic = orderResponse(profile, rate, seconds, [{ order: 8, rms: () => 0.03 }], 0.01, 43);
    const rpm = new Float64Array(mic.length).map((_, i) => profile.rpm(i / rate));
    const dir = await mkdtemp("/tmp/quiver-tones-stream-");
    try {
      // Shortest round-trip text: the file holds the very same doubles.
      const lines = ["time_s,n [rpm],mic [Pa]"];
      for (let i = 0; i < mic.length; i++) lines.push(`${i / rate},${rpm[i]},${mic[i]}`);
      await writeFile(`${dir}/r.csv`, lines.join("\n") + "\n");
      const options = {
        against: "rpm" as const,
        rpmChannel: "n",
        orders: [8],
        rpmStep: 100,
        block: 1024,
      };
      const memory = await tonesAnalysis({
        rate,
        startTime: 0,
        channels: [{ name: "n", unit: "rpm", data: rpm }, { name: "mic", unit: "Pa", data: mic }],
      }, options);
      const file = await tonesAnalysis(await openRecordingStream(`${dir}/r.csv`), options);
      for (const name of ["rpm", "frequency_hz", "level_db", "tnr_db", "pr_db"]) {
        const of = (t: typeof memory) =>
          t.table.columns.find((c) => c.name === name)!.values as Float64Array;
        expect(Array.from(of(file)), name).toEqual(Array.from(of(memory)));
      }
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });
});
