/**
 * ISO 2631-1's values of a weighted signal, against closed forms: sines of
 * known amplitude (a_w = |W(f)|·A/√2, crest factor √2, VDV = |W(f)|·A·(3T/8)^¼,
 * MTVV = a_w), a shock on steady vibration flagged, the vector sum and A(8).
 */
import { describe, expect, test } from "vitest";
import { VibrationMeter } from "../../lib/comfort/vibration_metrics.ts";
import { comfortAnalysis, handArmAnalysis } from "../../lib/comfort/comfort_analysis.ts";
import { analyticResponse } from "../../lib/comfort/vibration_weighting.ts";

const sine = (f: number, amplitude: number, seconds: number, rate: number) =>
  new Float64Array(Math.round(seconds * rate)).map((_, i) =>
    amplitude * Math.sin(2 * Math.PI * f * i / rate)
  );
const one = (name: string, data: Float64Array, rate: number) => ({
  rate,
  startTime: 0,
  channels: [{ name, unit: "m/s^2", data }],
});

describe("the values of a weighted signal", () => {
  test("a sine of amplitude A (whole periods): a_w = A/√2, MTVV = a_w, crest √2, VDV = A·(3T/8)^¼", () => {
    const a = 2.5, t = 8, rate = 200;
    const m = new VibrationMeter(rate);
    const x = sine(5, a, t, rate);
    for (let i = 0; i < x.length; i += 333) m.push(x.subarray(i, i + 333));
    const v = m.finish();
    expect(v.aw).toBeCloseTo(a / Math.SQRT2, 12);
    expect(v.mtvv).toBeCloseTo(a / Math.SQRT2, 12);
    expect(v.crestFactor).toBeCloseTo(Math.SQRT2, 12);
    // ∫(A sin)⁴ dt = 3A⁴T/8 over whole periods.
    expect(v.vdv).toBeCloseTo(a * (3 * t / 8) ** 0.25, 12);
    expect(v.vdvRatio).toBeCloseTo((3 / 8) ** 0.25 * Math.SQRT2, 12);
    expect(v.flags).toEqual([]);
    expect(v.duration).toBe(t);
  });

  test("a record shorter than τ has no MTVV", () => {
    const m = new VibrationMeter(100);
    m.push(sine(5, 1, 0.5, 100));
    expect(m.finish().mtvv).toBeNaN();
  });

  for (const [w, f] of [["wk", 6.3], ["wd", 1], ["wk", 2]] as const) {
    test(`${w} of a ${f} Hz sine: a_w, crest, VDV and MTVV from |${w}(${f})|`, async () => {
      // The sine fades in over R = 5 s (raised cosine e(t)), so that the filters start without
      // a jolt, then runs steady to T = 60 s. With |W| the weighting's gain at f, the envelope
      // slow beside f: ∫(e·sin)² = (T − R + 3R/8)/2, ∫(e·sin)⁴ = 3/8·(T − R + 35R/128).
      const a = 1.5, t = 60, ramp = 5, rate = 1000;
      const x = sine(f, a, t, rate);
      for (let i = 0; i < ramp * rate; i++) x[i] *= (1 - Math.cos(Math.PI * i / (ramp * rate))) / 2;
      const r = await comfortAnalysis(one("seat", x, rate), { weighting: w });
      const gain = Math.hypot(analyticResponse(w, f).re, analyticResponse(w, f).im);
      const aw = gain * a * Math.sqrt((t - ramp + 3 * ramp / 8) / (2 * t));
      const vdv = gain * a * (3 / 8 * (t - ramp + 35 * ramp / 128)) ** 0.25;
      const row = r.table.metadata.rows[0];
      expect(Math.abs(row.aw! / aw - 1)).toBeLessThan(0.002);
      expect(Math.abs(row.vdv! / vdv - 1)).toBeLessThan(0.002);
      // Steady: the peak is |W|·A, and the running r.m.s. |W|·A/√2 when τ holds whole periods;
      // otherwise the mean of sin² over τ swings by |sin(2πfτ)|/(2πfτ) about ½.
      expect(Math.abs(row.crest_factor! / (gain * a / aw) - 1)).toBeLessThan(0.003);
      const swing = Math.abs(Math.sin(2 * Math.PI * f)) / (2 * Math.PI * f);
      expect(Math.abs(row.mtvv! / (gain * a / Math.SQRT2 * Math.sqrt(1 + swing)) - 1))
        .toBeLessThan(0.003);
      expect(row.flags).toEqual([]);
    });
  }

  test("a shock on steady vibration passes ISO 2631-1's three limits and is flagged", async () => {
    // 0.3 m/s² at 4 Hz for 60 s, and at 30 s one 10 Hz cycle of 40 m/s².
    const rate = 1000;
    const x = sine(4, 0.3, 60, rate);
    for (let i = 0; i < 100; i++) x[30000 + i] += 40 * Math.sin(2 * Math.PI * 10 * i / rate);
    const r = await comfortAnalysis(one("seat", x, rate), { weighting: "wk" });
    const row = r.table.metadata.rows[0];
    expect(row.crest_factor!).toBeGreaterThan(9);
    expect(row.mtvv_ratio!).toBeGreaterThan(1.5);
    expect(row.vdv_ratio!).toBeGreaterThan(1.75);
    expect(row.flags).toEqual(["crest>9", "mtvv/aw>1.5", "vdv/(aw·T^0.25)>1.75"]);
    // The same in the table's flags column.
    expect(r.table.columns.at(-1)!.values[0]).toBe("crest>9;mtvv/aw>1.5;vdv/(aw·T^0.25)>1.75");
  });
});

describe("axes, the vector sum and A(8)", () => {
  const rate = 1000;
  const axes = {
    rate,
    startTime: 0,
    channels: [
      { name: "sx", unit: "m/s^2", data: sine(1, 1, 30, rate) },
      { name: "sy", unit: "m/s^2", data: sine(1, 2, 30, rate) },
      { name: "sz", unit: "m/s^2", data: sine(6.3, 1, 30, rate) },
    ],
  };
  test("seated health: Wd, Wd, Wk with k = 1.4, 1.4, 1 (ISO 2631-1 7.2.3), a_v = √Σ(k·a_w)²", async () => {
    const r = await comfortAnalysis(axes, {
      axes: { x: "sx", y: "sy", z: "sz" },
      location: "seat",
      purpose: "health",
    });
    const rows = r.table.metadata.rows;
    expect(rows.map((x) => [x.axis, x.channel, x.weighting, x.k])).toEqual([
      ["x", "sx", "wd", 1.4],
      ["y", "sy", "wd", 1.4],
      ["z", "sz", "wk", 1],
      ["sum", "", "", null],
    ]);
    const wd1 = Math.hypot(analyticResponse("wd", 1).re, analyticResponse("wd", 1).im);
    const wk = Math.hypot(analyticResponse("wk", 6.3).re, analyticResponse("wk", 6.3).im);
    const expected = Math.sqrt(
      (1.4 * wd1 / Math.SQRT2) ** 2 + (1.4 * 2 * wd1 / Math.SQRT2) ** 2 + (wk / Math.SQRT2) ** 2,
    );
    expect(Math.abs(rows[3].aw! / expected - 1)).toBeLessThan(0.005);
    // The total VDV is the fourth root of the sum of the axes' (k·VDV)⁴ (ISO 2631-1, from
    // memory), each axis's VDV the sine's closed form |W|·A·(3T/8)^¼.
    const vdv = (gain: number, amplitude: number) => gain * amplitude * (3 * 30 / 8) ** 0.25;
    const total = ((1.4 * vdv(wd1, 1)) ** 4 + (1.4 * vdv(wd1, 2)) ** 4 + vdv(wk, 1) ** 4) ** 0.25;
    expect(Math.abs(rows[3].vdv! / total - 1)).toBeLessThan(0.01);
    expect(r.table.columns.map((c) => c.unit === "" ? c.name : `${c.name} [${c.unit}]`)).toEqual([
      "axis",
      "channel",
      "weighting",
      "k",
      "aw [m/s^2]",
      "mtvv [m/s^2]",
      "vdv [m/s^1.75]",
      "crest_factor",
      "mtvv_ratio",
      "vdv_ratio",
      "flags",
    ]);
    expect(r.table.metadata.safety).toMatch(/not a certified measurement/);
  });

  test("a location and purpose ISO 2631-1 has no factors for is refused", async () => {
    await expect(comfortAnalysis(axes, {
      axes: { x: "sx", y: "sy", z: "sz" },
      location: "feet",
      purpose: "health",
    })).rejects.toThrow("ISO 2631-1 gives no axis factors for health at location feet");
  });

  test("hand-arm: a_hv = √Σa_hw² and A(8) = a_hv·√(T/8 h)", async () => {
    const hr = 10000;
    const ch = (name: string, f: number) => ({ name, unit: "m/s^2", data: sine(f, 4, 3, hr) });
    const r = await handArmAnalysis(
      { rate: hr, startTime: 0, channels: [ch("hx", 16), ch("hy", 31.5), ch("hz", 125)] },
      { axes: { x: "hx", y: "hy", z: "hz" }, exposureHours: 4.5 },
    );
    const g = (f: number) => Math.hypot(analyticResponse("wh", f).re, analyticResponse("wh", f).im);
    const ahv = Math.sqrt([16, 31.5, 125].reduce((s, f) => s + (g(f) * 4 / Math.SQRT2) ** 2, 0));
    const m = r.table.metadata;
    expect(Math.abs(m.a_hv! / ahv - 1)).toBeLessThan(0.005);
    expect(m.a8).toBeCloseTo(m.a_hv! * Math.sqrt(4.5 / 8), 12);
    expect(m.rows.map((x) => x.weighting)).toEqual(["wh", "wh", "wh", ""]);
  });

  test("a channel that is not an acceleration is refused, naming it", async () => {
    const rec = {
      rate,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data: sine(5, 1, 2, rate) }],
    };
    await expect(comfortAnalysis(rec, { weighting: "wk" })).rejects.toThrow(
      'channel "mic" is in Pa, not an acceleration',
    );
  });
});
