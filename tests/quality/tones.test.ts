/**
 * ECMA-418-1's tone-to-noise ratio and prominence ratio against closed
 * forms: a tone of known mean square in white noise of known density, the
 * critical bandwidth formula, the prominence criteria at and below 1 kHz,
 * no tone found in pure noise, and the streaming path equal to one pass.
 */
import { describe, expect, test } from "vitest";
import { assertClose } from "../helpers/assert_close.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { spectralEstimate } from "../../lib/dsp/spectral_core.ts";
import { criticalBandwidth } from "../../lib/quality/critical_band.ts";
import { prominenceRatio } from "../../lib/quality/prominence_ratio.ts";
import { findTones } from "../../lib/quality/tones_search.ts";
import { prCriterion, tnrCriterion } from "../../lib/quality/tones_criteria.ts";
import { tonesAnalysis } from "../../lib/quality/tones_analysis.ts";

// ECMA-418-1 (and ECMA-74 Annex D), from memory: Δf_c = 25 + 75·(1 + 1.4·(f/1000)²)^0.69 Hz.
const bandwidth = (f: number) => 25 + 75 * (1 + 1.4 * (f / 1000) ** 2) ** 0.69;

const RATE = 16384;
const BLOCK = 8192; // lines 2 Hz apart

/** A tone of rms `rms` at `f` Hz in Gaussian white noise of standard deviation `sigma`. */
function toneInNoise(f: number, rms: number, sigma: number, seconds: number, seed: number) {
  const noise = gaussianNoise(seed, seconds * RATE);
  return noise.map((v, i) => sigma * v + rms * Math.SQRT2 * Math.sin(2 * Math.PI * f * i / RATE));
}

/** One-sided density of white noise of variance σ² at the rate: 2σ²/fs (Bendat & Piersol, eq. 5.180). */
const whiteDensity = (sigma: number) => 2 * sigma * sigma / RATE;

const spectrumOf = (x: Float64Array) =>
  spectralEstimate([x], { rate: RATE, block: BLOCK, window: "hann" });

describe("critical bandwidth (ECMA-418-1)", () => {
  test("the formula at 100 Hz, 1 kHz and 5 kHz", () => {
    // Worked by hand from the formula at 1 kHz: 25 + 75·2.4^0.69 = 162.21 Hz.
    assertClose(criticalBandwidth(1000), 162.21, { relative: 0, absolute: 0.01 }, "1 kHz");
    // 100 Hz: 25 + 75·1.014^0.69 = 100.72 Hz; about 100 Hz at low frequencies (Zwicker, common practice).
    assertClose(criticalBandwidth(100), 100.72, { relative: 0, absolute: 0.01 }, "100 Hz");
    // 5 kHz: 25 + 75·36^0.69 = 25 + 75·11.854 = 914.0 Hz.
    assertClose(
      criticalBandwidth(5000),
      bandwidth(5000),
      { relative: 1e-12, absolute: 0 },
      "5 kHz",
    );
    assertClose(criticalBandwidth(5000), 914.0, { relative: 0, absolute: 0.1 }, "5 kHz, by hand");
  });
});

describe("tone-to-noise ratio of a tone in white noise (analytic)", () => {
  // TNR = 10·lg(tone mean square / (noise density × critical bandwidth)): ECMA-418-1's definition.
  for (const [f, rms] of [[250, 0.02], [1000, 0.02], [3150, 0.05], [1234.5, 0.01]] as const) {
    test(`${f} Hz`, () => {
      const sigma = 0.05;
      const est = spectrumOf(toneInNoise(f, rms, sigma, 60, 11));
      const tones = findTones(est.auto[0], est.df);
      expect(tones.length).toBe(1);
      const expected = 10 * Math.log10(rms * rms / (whiteDensity(sigma) * bandwidth(f)));
      // 60 s, ~240 averages: the noise estimate over the band is good to about 0.1 dB.
      assertClose(tones[0].tnrDb, expected, { relative: 0, absolute: 0.25 }, "TNR");
      assertClose(tones[0].frequency, f, { relative: 0, absolute: 0.2 }, "frequency");
      // The tone's level: its own mean square (Parseval over the Hann main lobe).
      assertClose(10 * Math.log10(tones[0].tonePower), 20 * Math.log10(rms), {
        relative: 0,
        absolute: 0.1,
      }, "tone level");
    });
  }
});

/** The centre c of the band with an edge at `edge`: c ± Δf_c(c)/2 = edge, by bisection (test's own). */
function centre(edge: number, sign: 1 | -1): number {
  let lo = 0, hi = 30_000;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (mid + sign * bandwidth(mid) / 2 < edge) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe("two tones in one critical band", () => {
  test("each is measured on its own: the other is neither its tone nor its noise", () => {
    // Tones at 2000 and 2060 Hz (Δf_c(2 kHz) ≈ 303 Hz holds both) in white noise: each TNR is
    // 10·lg(its mean square / (n0·Δf_c)) as if alone (our choice: ECMA-418-1's handling of
    // several tones in a band is not taken up).
    const sigma = 0.05, n0 = whiteDensity(sigma);
    const noise = gaussianNoise(15, 60 * RATE);
    const x = noise.map((v, i) =>
      sigma * v + 0.03 * Math.SQRT2 * Math.sin(2 * Math.PI * 2000 * i / RATE) +
      0.01 * Math.SQRT2 * Math.sin(2 * Math.PI * 2060 * i / RATE)
    );
    const est = spectrumOf(x);
    const tones = findTones(est.auto[0], est.df);
    expect(tones.map((t) => Math.round(t.frequency))).toEqual([2000, 2060]);
    tones.forEach((t, i) => {
      const rms = [0.03, 0.01][i];
      const expected = 10 * Math.log10(rms * rms / (n0 * bandwidth([2000, 2060][i])));
      assertClose(t.tnrDb, expected, { relative: 0, absolute: 0.25 }, `TNR ${t.frequency}`);
    });
  });
});

describe("prominence ratio of a tone in white noise (analytic)", () => {
  // PR = 10·lg(W_M / ((W_L + W_U)/2)), W the power in the middle critical band and the two
  // bands beside it, each as wide as the critical band at its centre (ECMA-418-1, from memory).
  test("at 1 kHz", () => {
    const f = 1000, rms = 0.02, sigma = 0.05;
    const n0 = whiteDensity(sigma);
    const f1 = f - bandwidth(f) / 2, f2 = f + bandwidth(f) / 2;
    const lower = bandwidth(centre(f1, 1)), upper = bandwidth(centre(f2, -1));
    const expected = 10 * Math.log10((rms * rms + n0 * bandwidth(f)) / (n0 * (lower + upper) / 2));
    const est = spectrumOf(toneInNoise(f, rms, sigma, 60, 12));
    assertClose(prominenceRatio(est.auto[0], est.df, f), expected, {
      relative: 0,
      absolute: 0.15,
    }, "PR");
  });

  test("below 171.4 Hz the lower band runs from 20 Hz, scaled to 100 Hz (from memory)", () => {
    const f = 120, rms = 0.02, sigma = 0.05;
    const n0 = whiteDensity(sigma);
    const f2 = f + bandwidth(f) / 2;
    const upper = bandwidth(centre(f2, -1));
    // The lower band's noise n0·(f1 − 20) scaled by 100/(f1 − 20): n0·100.
    const expected = 10 * Math.log10((rms * rms + n0 * bandwidth(f)) / (n0 * (100 + upper) / 2));
    const est = spectrumOf(toneInNoise(f, rms, sigma, 60, 13));
    assertClose(prominenceRatio(est.auto[0], est.df, f), expected, {
      relative: 0,
      absolute: 0.2,
    }, "PR");
  });
});

describe("prominence criteria (ECMA-418-1, from memory)", () => {
  test("TNR: 8 dB from 1 kHz up, 8 + 8.33·lg(1000/f) below; PR: 9 dB and 9 + 10·lg(1000/f)", () => {
    expect(tnrCriterion(1000)).toBe(8);
    expect(tnrCriterion(5000)).toBe(8);
    assertClose(tnrCriterion(500)!, 8 + 8.33 * 0.30103, { relative: 0, absolute: 1e-4 }, "TNR 500");
    assertClose(tnrCriterion(100)!, 16.33, { relative: 0, absolute: 1e-12 }, "TNR 100");
    expect(prCriterion(1000)).toBe(9);
    assertClose(prCriterion(500)!, 12.0103, { relative: 0, absolute: 1e-4 }, "PR 500");
    assertClose(prCriterion(200)!, 9 + 10 * 0.69897, { relative: 0, absolute: 1e-4 }, "PR 200");
    // The criteria's range: 89.1 Hz to 11.22 kHz.
    expect(tnrCriterion(89)).toBeUndefined();
    expect(tnrCriterion(12_000)).toBeUndefined();
  });

  test("a 500 Hz tone 2 dB over the criterion is prominent, 2 dB under it is not", () => {
    const f = 500, sigma = 0.05;
    const n0 = whiteDensity(sigma);
    const limit = 8 + 8.33 * Math.log10(1000 / f);
    for (const offset of [2, -2]) {
      const rms = Math.sqrt(n0 * bandwidth(f) * 10 ** ((limit + offset) / 10));
      const est = spectrumOf(toneInNoise(f, rms, sigma, 60, 14));
      const [tone] = findTones(est.auto[0], est.df);
      expect(tone.prominent).toBe(offset > 0);
      assertClose(tone.marginDb, offset, { relative: 0, absolute: 0.3 }, "margin");
    }
  });
});

describe("pure noise", () => {
  test("no tone is found in Gaussian white noise (seeded)", () => {
    for (const seed of [21, 22, 23]) {
      const est = spectrumOf(gaussianNoise(seed, 30 * RATE));
      expect(findTones(est.auto[0], est.df)).toEqual([]);
    }
  });
});

describe("streaming", () => {
  test("the analysis read in chunks equals one pass over the whole record", async () => {
    const x = toneInNoise(2000, 0.03, 0.05, 20, 31); // 327 680 samples: five chunks of the reader
    const { table } = await tonesAnalysis(
      { rate: RATE, startTime: 0, channels: [{ name: "mic", unit: "Pa", data: x }] },
      { block: BLOCK },
    );
    const est = spectrumOf(x);
    const once = findTones(est.auto[0], est.df);
    const col = (n: string) => table.columns.find((c) => c.name === n)!.values as Float64Array;
    expect(Array.from(col("tnr_db"))).toEqual(once.map((t) => t.tnrDb));
    expect(Array.from(col("pr_db"))).toEqual(once.map((t) => t.prDb));
    expect(Array.from(col("frequency_hz"))).toEqual(once.map((t) => t.frequency));
    // 20·lg of the rms: the level of 0.03 Pa re 20 µPa is 63.52 dB (10 vs 20 lg would show here).
    assertClose(col("level_db")[0], 20 * Math.log10(0.03 / 20e-6), {
      relative: 0,
      absolute: 0.1,
    }, "level");
  });
});
