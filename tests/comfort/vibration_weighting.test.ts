/**
 * The weightings of ISO 2631-1 and ISO 5349-1: the analytic response against
 * the standards' formulas and tabulated values typed in here, the digital
 * filters against the analytic response (ISO 8041-1-like tolerance) and
 * against scipy.signal applying the same design.
 */
import { describe, expect, test } from "vitest";
import { CascadeFilter, cascadeResponse } from "../../lib/acoustics/biquad.ts";
import {
  analyticResponse,
  leastRate,
  nominalFrequencies,
  VIBRATION_WEIGHTINGS,
  type VibrationWeighting,
  weightingSections,
  worstDeviationDb,
} from "../../lib/comfort/vibration_weighting.ts";
import { readJsonFixture } from "../helpers/fixtures.ts";

// ISO 2631-1:1997 Table 3 (Wk, Wd) and ISO 5349-1:2001 Table A.2 (Wh): the weighting factors
// at one-third-octave band centres, typed from memory (three digits). The tables give them at
// the exact frequencies 10^(n/10); the tolerance, 1 %, covers the rounding and a slip of memory
// in the last digit, and is far tighter than any wrong parameter (a factor 2, a swapped Q).
const TABULATED: Record<string, [number, number][]> = {
  wk: [[0.5, 0.418], [1, 0.482], [2, 0.531], [4, 0.967], [6.3, 1.054], [8, 1.036], [10, 0.988], [
    12.5,
    0.902,
  ]],
  wd: [[0.5, 0.853], [1, 1.011], [2, 0.890], [4, 0.512]],
  wh: [
    [6.3, 0.727],
    [8, 0.873],
    [10, 0.951],
    [12.5, 0.958],
    [16, 0.896],
    [20, 0.782],
    [31.5, 0.519],
    [63, 0.256],
    [100, 0.160],
  ],
};

const exact = (nominal: number) => 10 ** (Math.round(10 * Math.log10(nominal)) / 10);
const abs = (h: { re: number; im: number }) => Math.hypot(h.re, h.im);

describe("the analytic weightings", () => {
  for (const [w, rows] of Object.entries(TABULATED)) {
    test(`${w} equals its tabulated factors within 1 %`, () => {
      for (const [f, value] of rows) {
        const got = abs(analyticResponse(w as VibrationWeighting, exact(f)));
        expect(Math.abs(got / value - 1), `${w} at ${f} Hz: ${got}`).toBeLessThan(0.01);
      }
    });
  }

  // ISO 2631-1:1997 Annex A (A.2, Table A.2) and ISO 5349-1:2001 Annex A, typed in again
  // here (from memory): f1, f2, f3, f4, Q4, f5, Q5, f6, Q6, K; Infinity leaves a factor out.
  const I = Infinity;
  const TABLE_A2: Record<VibrationWeighting, number[]> = {
    wk: [0.4, 100, 12.5, 12.5, 0.63, 2.37, 0.91, 3.35, 0.91, 1],
    wd: [0.4, 100, 2, 2, 0.63, I, 1, I, 1, 1],
    wf: [0.08, 0.63, I, 0.25, 0.86, 0.0625, 0.8, 0.1, 0.8, 1],
    wc: [0.4, 100, 8, 8, 0.63, I, 1, I, 1, 1],
    we: [0.4, 100, 1, 1, 0.63, I, 1, I, 1, 1],
    wj: [0.4, 100, I, I, 1, 3.75, 0.91, 5.32, 0.91, 1],
    wh: [6.31, 1258.9, 15.915, 15.915, 0.64, I, 1, I, 1, 1],
  };
  type C = [number, number];
  const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  const div = (a: C, b: C): C => {
    const d = b[0] * b[0] + b[1] * b[1];
    return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
  };
  /** 1 + s/(Q·w) + s²/w² at s = j·2πf, written as in the standard; w = ∞ gives 1. */
  const quad = (f: number, w: number, q: number): C =>
    w === I ? [1, 0] : [1 - (f / w) ** 2, f / (q * w)];
  function standard(weighting: VibrationWeighting, f: number): C {
    const [f1, f2, f3, f4, q4, f5, q5, f6, q6, k] = TABLE_A2[weighting];
    const hh = div([1, 0], [1 - (f1 / f) ** 2, -Math.SQRT2 * f1 / f]); // 1/(1 + √2ω1/s + ω1²/s²)
    const hl = div([1, 0], quad(f, f2, Math.SQRT1_2));
    const ht = div(f3 === I ? [1, 0] : [1, f / f3], quad(f, f4, q4));
    const hs = mul(div(quad(f, f5, q5), quad(f, f6, q6)), [f5 === I ? 1 : (f5 / f6) ** 2, 0]);
    return mul([k, 0], mul(mul(hh, hl), mul(ht, hs)));
  }

  for (const w of VIBRATION_WEIGHTINGS) {
    test(`${w}: magnitude and phase equal the standard's formula over its band`, () => {
      for (const f of [...nominalFrequencies(w), TABLE_A2[w][0], TABLE_A2[w][1]]) {
        const [re, im] = standard(w, f);
        const h = analyticResponse(w, f);
        expect(Math.hypot(h.re - re, h.im - im) / Math.hypot(re, im), `${f} Hz`).toBeLessThan(
          1e-12,
        );
      }
    });
  }
});

describe("the digital weightings", () => {
  for (const w of VIBRATION_WEIGHTINGS) {
    test(`${w}: within 1 dB of the analytic response over the nominal range from the least rate`, () => {
      // ISO 8041-1's tolerance over the nominal frequency range, from memory: about ±1 dB
      // (+12 %/−11 %). At 10× the least rate the warping leaves less than 0.02 dB.
      for (const factor of [1, 1.5, 2, 3]) {
        expect(Math.abs(worstDeviationDb(w, factor * leastRate(w)))).toBeLessThan(1);
      }
      expect(Math.abs(worstDeviationDb(w, 10 * leastRate(w)))).toBeLessThan(0.02);
      // Phase too, at the least rate: within 10° up to half the nominal range's top.
      const rate = leastRate(w), sections = weightingSections(w, rate);
      for (const f of nominalFrequencies(w).filter((f) => f <= nominalFrequencies(w).at(-1)! / 2)) {
        const d = cascadeResponse(sections, f, rate), a = analyticResponse(w, f);
        const phase = Math.atan2(d.im * a.re - d.re * a.im, d.re * a.re + d.im * a.im);
        expect(Math.abs(phase) * 180 / Math.PI, `${f} Hz`).toBeLessThan(10);
      }
    });
  }

  test("a rate below 4× the band's upper limit is refused, naming the least rate", () => {
    expect(() => weightingSections("wk", 399)).toThrow(
      "weighting wk needs a sample rate of at least 400 Hz (4 × its upper band limit of 100 Hz); " +
        "the recording's is 399 Hz",
    );
    expect(() => weightingSections("wh", 5000)).toThrow(/at least 5035\.6 Hz/);
    expect(() => weightingSections("wf", 5)).toThrow(/at least 5\.04 Hz \(8 ×/);
    expect(weightingSections("wk", 400)).toHaveLength(4);
  });
});

// fixtures/reference/vibration_weighting_reference.json: tests/reference/
// make_vibration_weighting_reference.py (scipy.signal.bilinear per analog section,
// pre-warped, then scipy.signal.sosfilt on seeded random data).
const ref = readJsonFixture<{
  provenance: { scipy: string };
  input: number[];
  cases: { weighting: VibrationWeighting; rate: number; sos: number[][]; output: number[] }[];
}>("reference/vibration_weighting_reference.json");

describe("the digital weightings equal scipy.signal's of the same design", () => {
  for (const c of ref.cases) {
    test(`${c.weighting} at ${c.rate} Hz: sections and the filtered signal (fed in chunks)`, () => {
      const sections = weightingSections(c.weighting, c.rate);
      expect(sections).toHaveLength(c.sos.length);
      sections.forEach((s, i) => {
        const [b0, b1, b2, a0, a1, a2] = c.sos[i];
        expect(a0).toBe(1);
        [[s.b0, b0], [s.b1, b1], [s.b2, b2], [s.a1, a1], [s.a2, a2]].forEach(([ours, theirs]) =>
          expect(Math.abs(ours - theirs)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(theirs)))
        );
      });
      // Odd chunk lengths: the state must carry from chunk to chunk.
      const filter = new CascadeFilter(sections);
      const x = Float64Array.from(ref.input);
      const y = new Float64Array(x.length);
      for (let start = 0, n = 7; start < x.length; start += n, n = n * 3 % 101 + 1) {
        y.set(filter.process(x.slice(start, start + n)), start);
      }
      // Relative to the output's scale: single samples pass through zero.
      let scale = 0;
      for (const v of c.output) scale = Math.max(scale, Math.abs(v));
      c.output.forEach((v, i) =>
        expect(Math.abs(y[i] - v), `sample ${i}`).toBeLessThanOrEqual(1e-9 * scale)
      );
    });
  }
});
