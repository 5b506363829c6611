import { describe, test } from "vitest";
import { realFftPlan } from "../../lib/dsp/fft.ts";
import { assertClose, maxAbs } from "../helpers/assert_close.ts";
import { gaussianNoise } from "../helpers/random.ts";

/** The DFT by its definition, X[k] = Σ x[n]·e^(−2πikn/N) (analytic reference). */
function naiveDft(x: Float64Array): { re: number[]; im: number[] } {
  const n = x.length;
  const re: number[] = [];
  const im: number[] = [];
  for (let k = 0; k <= Math.floor(n / 2); k++) {
    let sr = 0;
    let si = 0;
    for (let j = 0; j < n; j++) {
      const phase = -2 * Math.PI * ((k * j) % n) / n;
      sr += x[j] * Math.cos(phase);
      si += x[j] * Math.sin(phase);
    }
    re.push(sr);
    im.push(si);
  }
  return { re, im };
}

describe("realFftPlan", () => {
  for (const size of [2, 4, 8, 16, 64, 1024, 3, 5, 12, 250, 255, 1000]) {
    test(`matches the DFT definition for ${size} samples`, () => {
      const x = gaussianNoise(size, size);
      const plan = realFftPlan(size);
      const re = new Float64Array(plan.lines);
      const im = new Float64Array(plan.lines);
      plan.forward(x, re, im);
      const ref = naiveDft(x);
      const scale = maxAbs(ref.re) + maxAbs(ref.im);
      assertClose(re, ref.re, { relative: 0, absolute: 1e-11 * scale }, "re");
      assertClose(im, ref.im, { relative: 0, absolute: 1e-11 * scale }, "im");
    });
  }

  test("reuses one plan per size", () => {
    if (realFftPlan(512) !== realFftPlan(512)) throw new Error("plan was rebuilt");
  });
});
