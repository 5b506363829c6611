/**
 * The F and normal distributions of `quiver diff` against scipy.stats
 * (fixtures/reference/f_quantile_reference.json, written by
 * tests/reference/make_f_quantile_reference.py) and against closed forms.
 */
import { readFileSync } from "node:fs";
import { expect, test } from "vitest";
import {
  fCdf,
  fQuantile,
  lnGamma,
  normalQuantile,
  regularizedBeta,
} from "../../lib/history/confidence_distributions.ts";
import { powerRatioInterval } from "../../lib/history/confidence_intervals.ts";
import { assertClose } from "../helpers/assert_close.ts";

interface Reference {
  f_ppf: { p: number; d1: number; d2: number; ppf: number }[];
  f_cdf: { x: number; d1: number; d2: number; cdf: number }[];
  norm_ppf: { p: number; ppf: number }[];
}
const REFERENCE: Reference = JSON.parse(
  readFileSync(
    new URL("../../fixtures/reference/f_quantile_reference.json", import.meta.url),
    "utf8",
  ),
);

test("F quantiles agree with scipy.stats.f.ppf to 1e-9 relative", () => {
  expect(REFERENCE.f_ppf.length).toBeGreaterThan(100);
  for (const r of REFERENCE.f_ppf) {
    // scipy.stats.f.ppf (fixture); its own accuracy is near 1e-12 relative.
    assertClose(
      fQuantile(r.p, r.d1, r.d2),
      r.ppf,
      { relative: 1e-9, absolute: 0 },
      `F(${r.d1}, ${r.d2}) at ${r.p}`,
    );
  }
});

test("F distribution function agrees with scipy.stats.f.cdf to 1e-11", () => {
  for (const r of REFERENCE.f_cdf) {
    // scipy.stats.f.cdf (fixture)
    assertClose(
      fCdf(r.x, r.d1, r.d2),
      r.cdf,
      { relative: 1e-10, absolute: 1e-13 },
      `cdf F(${r.d1}, ${r.d2}) at ${r.x}`,
    );
  }
});

test("normal quantiles agree with scipy.stats.norm.ppf", () => {
  for (const r of REFERENCE.norm_ppf) {
    // scipy.stats.norm.ppf (fixture)
    assertClose(normalQuantile(r.p), r.ppf, { relative: 1e-10, absolute: 1e-12 }, `z at ${r.p}`);
  }
});

test("closed forms: F(2, 2) and the incomplete beta", () => {
  // Analytic: for F(2, 2), P(F ≤ f) = f/(1 + f), so the p-quantile is p/(1 − p).
  for (const p of [0.025, 0.5, 0.975]) {
    assertClose(
      fQuantile(p, 2, 2),
      p / (1 - p),
      { relative: 1e-12, absolute: 0 },
      `F(2,2) at ${p}`,
    );
  }
  // Analytic: I_x(a, 1) = x^a.
  assertClose(regularizedBeta(0.7, 3.5, 1), 0.7 ** 3.5, { relative: 1e-13, absolute: 0 });
  // Γ(10) = 9! = 362880 (analytic).
  assertClose(lnGamma(10), Math.log(362880), { relative: 1e-14, absolute: 0 });
});

test("impossible parameters are refused", () => {
  expect(() => fQuantile(1, 2, 2)).toThrow(RangeError);
  expect(() => fQuantile(0.5, 0, 2)).toThrow(RangeError);
  expect(() => normalQuantile(0)).toThrow(RangeError);
});

test("a power ratio's interval comes from F(ν_c, ν_b), the candidate's degrees of freedom first", () => {
  // Bendat & Piersol, Random Data, ch. 8: Ĝ_c/Ĝ_b ~ F(ν_c, ν_b) when both estimate the same G.
  // Quantiles from scipy.stats.f.ppf (fixture): F(30, 158) at 0.025 and 0.975.
  const q = (p: number) =>
    REFERENCE.f_ppf.find((r) => r.d1 === 30 && r.d2 === 158 && r.p === p)!.ppf;
  const c = powerRatioInterval(2, 158, 30, 0.95);
  assertClose(c.differenceDb, 10 * Math.log10(2), { relative: 1e-14, absolute: 0 });
  assertClose(c.lowerDb, 10 * Math.log10(2 / q(0.975)), { relative: 1e-9, absolute: 1e-12 });
  assertClose(c.upperDb, 10 * Math.log10(2 / q(0.025)), { relative: 1e-9, absolute: 1e-12 });
  expect(c.significant).toBe(10 * Math.log10(2 / q(0.975)) > 0);
});
