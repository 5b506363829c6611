/**
 * ISO 532-1:2017's method for time-varying sounds: it agrees with the
 * stationary method on a steady sound, short sounds are less loud, the decay
 * after a sound, N5 and N10 as order statistics, and the streaming path
 * equal to one pass.
 */
import { describe, expect, test } from "vitest";
import { assertClose } from "../helpers/assert_close.ts";
import { uniformGenerator } from "../helpers/random.ts";
import { decay, TimeVaryingLoudnessMeter } from "../../lib/quality/loudness_time_varying.ts";
import { StationaryBandMeter } from "../../lib/quality/loudness_stationary.ts";
import { LoudnessHistogram } from "../../lib/quality/loudness_percentiles.ts";
import { loudnessAnalysis } from "../../lib/quality/loudness_analysis.ts";
import { bandNoise, tones } from "./signals.ts";

const RATE = 48000;

function meter(x: Float64Array, chunk = x.length) {
  const m = new TimeVaryingLoudnessMeter(RATE, { history: true });
  for (let at = 0; at < x.length; at += chunk) m.push(x.slice(at, at + chunk));
  return m.finish();
}

describe("time-varying loudness", () => {
  test("a steady sound: N5 equals the stationary loudness within 3 %", async () => {
    // ISO 532-1:2017 (from memory): for a stationary sound the time-varying method gives the
    // stationary method's loudness; N5 sits a little above the mean for a noise.
    const x = bandNoise(RATE, 3, 300, 3000, 65);
    const r = await loudnessAnalysis({
      rate: RATE,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data: x }],
    });
    const v = meter(x);
    assertClose(v.n5, r.table.metadata.rows[0].loudness!, { relative: 0.03, absolute: 0 }, "N5");
    expect(v.n10).toBeLessThanOrEqual(v.n5);
    expect(v.steps).toBe(1500);
  }, 120_000);

  test("a 10 ms burst is much less loud than the steady tone; a 500 ms one nearly as loud", () => {
    // Zwicker & Fastl, Psychoacoustics, ch. 8 (temporal integration, from memory): loudness
    // falls for durations below about 100 ms, to about half at 10 ms.
    const steady = meter(tones(RATE, 1, [[1000, 70]])).history!.at(-1)!;
    const burst = (seconds: number) => {
      const x = new Float64Array(RATE);
      x.set(tones(RATE, seconds, [[1000, 70]]), RATE / 10);
      return meter(x).nMax;
    };
    expect(burst(0.01)).toBeLessThan(0.7 * steady);
    expect(burst(0.5)).toBeGreaterThan(0.9 * steady);
  }, 120_000);

  test("after a sound stops, N falls below a tenth within 200 ms", () => {
    // ISO 532-1:2017 / DIN 45631/A1 (from memory): post-masking-like decay over tens of ms.
    const x = new Float64Array(RATE);
    x.set(tones(RATE, 0.5, [[1000, 70]]));
    const h = meter(x).history!;
    const at = (t: number) => h[Math.round(t / 0.002) - 1];
    expect(at(0.7)).toBeLessThan(0.1 * at(0.5));
    expect(at(0.52)).toBeGreaterThan(0.3 * at(0.5)); // it does not vanish at once
  }, 120_000);

  test("chunks of any size give exactly one pass's numbers", () => {
    // An analytic equality: every filter and the decay keep their state between chunks.
    const x = bandNoise(RATE, 1, 100, 6000, 60, 11);
    const whole = meter(x);
    for (const chunk of [777, 4096]) {
      const v = meter(x, chunk);
      expect(v.n5).toBe(whole.n5);
      expect(v.n10).toBe(whole.n10);
      expect(v.loudness).toBe(whole.loudness);
      expect(Array.from(v.history!)).toEqual(Array.from(whole.history!));
    }
  }, 120_000);
});

describe("the nonlinear decay", () => {
  const after = (steps: number) => {
    const out = new Float64Array(1), store = new Float64Array(1);
    for (let i = 0; i < steps; i++) decay(new Float64Array([1]), out, store);
    for (let i = 0; i < 10; i++) decay(new Float64Array([0]), out, store); // 20 ms of silence
    return out[0];
  };
  test("a long sound dies away with the long time constant, a short burst much faster", () => {
    // DIN 45631/A1 (from memory): τ = 15 ms after a long sound, 5 ms after a short one; 20 ms
    // after a long sound the output is at least e^(−20/15) = 0.26 of it (it cannot fall faster
    // than its store), after a 4-ms burst below 0.1.
    const long = after(500);
    expect(long).toBeGreaterThanOrEqual(Math.exp(-20 / 15));
    expect(long).toBeLessThan(0.45);
    expect(after(2)).toBeLessThan(0.1);
  });
});

describe("stationary band levels", () => {
  test("chunks of any size give exactly one pass's levels", () => {
    // An analytic equality: the filter bank keeps its state between chunks.
    const x = bandNoise(RATE, 1, 30, 12000, 60, 13);
    const levels = (chunk: number) => {
      const m = new StationaryBandMeter(RATE, x.length);
      for (let at = 0; at < x.length; at += chunk) m.push(x.slice(at, at + chunk));
      return Array.from(m.finish().levels);
    };
    const whole = levels(x.length);
    expect(levels(777)).toEqual(whole);
    expect(levels(65536)).toEqual(whole);
  }, 120_000);
});

describe("percentiles from the histogram", () => {
  test("N5 and N10 equal the sorted values within 0.01 %", () => {
    // Exceeded 5 % of the time: the ⌈0.95·n⌉-th smallest (common practice for percentile levels).
    const u = uniformGenerator(5);
    const values = Array.from({ length: 10007 }, () => 50 * u() ** 3);
    const h = new LoudnessHistogram();
    for (const v of values) h.add(v);
    const sorted = [...values].sort((a, b) => a - b);
    for (const p of [0.05, 0.1, 0.5]) {
      const expected = sorted[Math.ceil((1 - p) * values.length) - 1];
      assertClose(h.exceeded(p), expected, { relative: 1e-4, absolute: 1e-4 }, `p ${p}`);
    }
  });
});
