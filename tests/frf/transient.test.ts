import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import type { Recording } from "../../lib/io/recording.ts";
import { recordingSource, sliceStream } from "../../lib/io/recording_stream.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { gaussianNoise, uniformGenerator } from "../helpers/random.ts";

// A single-degree-of-freedom system in discrete time by impulse invariance (Oppenheim & Schafer,
// Discrete-Time Signal Processing, 3rd ed., 7.2.1, section from memory): poles r·e^(±jθ) with r = exp(−ζωn/fs),
// θ = ωn√(1−ζ²)/fs, so y[n] = x[n] + 2r·cosθ·y[n−1] − r²·y[n−2] and, exactly,
// H(e^jΩ) = 1 / (1 − 2r·cosθ·e^(−jΩ) + r²·e^(−2jΩ)).
const RATE = 1024, FN = 50, ZETA = 0.02;
const R = Math.exp((-ZETA * 2 * Math.PI * FN) / RATE);
const THETA = (2 * Math.PI * FN * Math.sqrt(1 - ZETA * ZETA)) / RATE;
const A1 = -2 * R * Math.cos(THETA), A2 = R * R;

function analyticMagnitude(f: number): number {
  const w = (2 * Math.PI * f) / RATE;
  const re = 1 + A1 * Math.cos(w) + A2 * Math.cos(2 * w);
  const im = -A1 * Math.sin(w) - A2 * Math.sin(2 * w);
  return 1 / Math.hypot(re, im);
}

function throughSystem(x: Float64Array): Float64Array {
  const y = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) {
    y[i] = x[i] - A1 * (i > 0 ? y[i - 1] : 0) - A2 * (i > 1 ? y[i - 2] : 0);
  }
  return y;
}

const recording = (x: Float64Array): Recording => ({
  rate: RATE,
  startTime: 0,
  channels: [
    { name: "force", unit: "N", data: x },
    { name: "acc", unit: "m/s^2", data: throughSystem(x) },
  ],
});

// Burst random (common practice): Gaussian noise for 1 s of every 2 s, starting 0.25 s into
// each period, zero otherwise. The decay time 1/(ζωn) = 0.16 s: the 1 s of quiet holds 6 of them.
const PERIOD = 2048, ON = 1024, OFFSET = 256, PERIODS = 16;
function burstRandom(seed: number): Float64Array {
  const noise = gaussianNoise(seed, PERIOD * PERIODS);
  return noise.map((v, i) => {
    const phase = i % PERIOD;
    return phase >= OFFSET && phase < OFFSET + ON ? v : 0;
  });
}

/** Largest |dB error| of the FRF against the analytic one over the half-power band. */
function worstInHalfPowerBand(
  table: { columns: readonly { name: string; values: Float64Array }[] },
) {
  const f = table.columns[0].values;
  const mag = table.columns.find((c) => c.name === "acc_mag")!.values;
  // Analytic peak of the discrete system on a fine grid, for the band's edges.
  let peak = 0;
  for (let v = 40; v <= 60; v += 0.001) peak = Math.max(peak, analyticMagnitude(v));
  let worst = 0;
  f.forEach((v, k) => {
    const h = analyticMagnitude(v);
    if (h >= peak / Math.SQRT2) worst = Math.max(worst, Math.abs(20 * Math.log10(mag[k] / h)));
  });
  return worst;
}

describe("frf: transient excitation is found and answered with the segmenting that suits it", () => {
  test("burst random at the defaults: a warning naming rectangular, the period as block, and a start", async () => {
    const rec = recording(burstRandom(11));
    const r = await frequencyResponse(rec, { input: "force", outputs: ["acc"] });
    const excitation = r.table.metadata.excitation as Record<string, unknown>;
    expect(excitation.transient).toBe(true);
    expect(excitation.burst_period_samples).toBe(PERIOD);
    expect(excitation.segmenting_suits).toBe(false);
    const warning = r.warnings.find((w) => w.startsWith("transient excitation"));
    expect(warning).toMatch(/--window rectangular --block 2048 --overlap 0 --start /);
    // The defaults (Hann, 4096 samples, 50 %) read the resonance low: the naive choice is wrong
    // on these data.
    expect(worstInHalfPowerBand(r.table)).toBeGreaterThan(0.3);
  });

  test("with the suggested settings the FRF is within 0.05 dB of the analytic |H| over the half-power band", async () => {
    const rec = recording(burstRandom(11));
    const first = await frequencyResponse(rec, { input: "force", outputs: ["acc"] });
    const suggested = (first.table.metadata.excitation as {
      suggested: { window: "rectangular"; block: number; overlap: number; startS: number };
    }).suggested;
    // In the quiet before the first burst (0.25 s), after the record's start.
    expect(suggested.startS).toBeGreaterThanOrEqual(0);
    expect(suggested.startS).toBeLessThan(OFFSET / RATE);
    const r = await frequencyResponse(
      sliceStream(recordingSource(rec), suggested.startS, undefined),
      {
        input: "force",
        outputs: ["acc"],
        window: suggested.window,
        block: suggested.block,
        overlap: suggested.overlap,
      },
    );
    // Each block holds whole bursts and decays: the DFT relation Y = H·X holds line by line
    // up to the 6 decay times' residue (e^−6 ≈ −52 dB); 0.05 dB is our tolerance.
    expect(worstInHalfPowerBand(r.table)).toBeLessThan(0.05);
    expect((r.table.metadata.excitation as { segmenting_suits: boolean }).segmenting_suits).toBe(
      true,
    );
    expect(r.warnings.some((w) => w.startsWith("transient excitation"))).toBe(false);
    // The same window and block started inside a burst (0.75 s) cut every burst in two: the
    // naive check "rectangular and one period" would pass it; quiver warns and names a start.
    const cut = await frequencyResponse(sliceStream(recordingSource(rec), 0.75, undefined), {
      input: "force",
      outputs: ["acc"],
      window: "rectangular",
      block: PERIOD,
      overlap: 0,
    });
    expect(worstInHalfPowerBand(cut.table)).toBeGreaterThan(0.3);
    expect(cut.warnings.find((w) => w.startsWith("transient excitation"))).toMatch(
      /--start 2\.\d+/,
    );
  });

  test("stationary random and a sine sweep are not transient", async () => {
    const random = await frequencyResponse(recording(gaussianNoise(12, PERIOD * PERIODS)), {
      input: "force",
      outputs: ["acc"],
    });
    // A linear sweep 5…200 Hz over the record.
    const n = PERIOD * PERIODS, duration = n / RATE;
    const sweep = new Float64Array(n).map((_, i) => {
      const t = i / RATE;
      return Math.sin(2 * Math.PI * (5 * t + ((200 - 5) / (2 * duration)) * t * t));
    });
    const swept = await frequencyResponse(recording(sweep), { input: "force", outputs: ["acc"] });
    for (const r of [random, swept]) {
      expect((r.table.metadata.excitation as { transient: boolean }).transient).toBe(false);
      expect(r.warnings.some((w) => w.startsWith("transient excitation"))).toBe(false);
    }
  });

  test("impacts at irregular times: transient without a period, a warning naming rectangular and hammer", async () => {
    // Half-sine pulses of 8 samples at random intervals of 1500–2500 samples.
    const uniform = uniformGenerator(13);
    const x = new Float64Array(PERIOD * PERIODS);
    for (let at = 300; at + 8 < x.length; at += 1500 + Math.floor(1000 * uniform())) {
      for (let i = 0; i < 8; i++) x[at + i] = Math.sin((Math.PI * (i + 0.5)) / 8);
    }
    const r = await frequencyResponse(recording(x), { input: "force", outputs: ["acc"] });
    const excitation = r.table.metadata.excitation as Record<string, unknown>;
    expect(excitation.transient).toBe(true);
    expect(excitation.burst_period_samples).toBe(null);
    expect(r.warnings.find((w) => w.startsWith("transient excitation"))).toMatch(
      /no regular period.*--window rectangular.*quiver hammer/,
    );
  });

  test("the command prints the warning; its own flags, given back, silence it", async () => {
    const dir = await mkdtemp("/tmp/quiver-frf-transient-");
    await writeFile(`${dir}/burst.csv`, recordingCsv(recording(burstRandom(14))));
    const base = ["frf", "burst.csv", "--rate", String(RATE), "--input", "force"];
    const first = runQuiver([...base, "--outputs", "acc", "--out", "a.csv"], dir);
    expect(first.code, first.stderr).toBe(0);
    const flags = /(--window rectangular --block \d+ --overlap 0 --start \S+)/.exec(first.stderr);
    expect(flags, first.stderr).not.toBe(null);
    const second = runQuiver(
      [...base, "--outputs", "acc", "--out", "b.csv", ...flags![1].split(" ")],
      dir,
    );
    expect(second.code, second.stderr).toBe(0);
    expect(second.stderr).not.toMatch(/transient excitation/);
    const meta = JSON.parse(await readFile(`${dir}/b.csv.meta.json`, "utf8"));
    expect(meta.metadata.excitation.segmenting_suits).toBe(true);
    assertClose(meta.metadata.excitation.burst_period_samples, PERIOD, {
      relative: 0,
      absolute: 0,
    }, "period");
  });
});
