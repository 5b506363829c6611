import { describe, expect, test } from "vitest";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import { multipleInputFrf } from "../../lib/frf/multiple_input.ts";
import type { Recording } from "../../lib/io/recording.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { add, fir, firResponse, scale } from "../helpers/fir.ts";
import { gaussianNoise } from "../helpers/random.ts";

const RATE = 1024;
const N = 2 ** 19;
const BLOCK = 512;

/** The inverse of a real 3×3 matrix by cofactors (written here, independent of the code). */
function inverse3(m: number[][]): number[][] {
  const [[a, b, c], [d, e, f], [g, h, i]] = m;
  const det = a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g);
  return [
    [(e * i - f * h) / det, (c * h - b * i) / det, (b * f - c * e) / det],
    [(f * g - d * i) / det, (a * i - c * g) / det, (c * d - a * f) / det],
    [(d * h - e * g) / det, (b * g - a * h) / det, (a * e - b * d) / det],
  ];
}

// Three inputs from a common source s plus one independent source each (unit
// variance white noise): x = A·[s, u1, u2, u3]. Two outputs through known FIR
// paths, with white noise of standard deviation 0.05 and 0.1 added.
const A = [
  [1, 0.5, 0, 0],
  [0.8, 0, 0.6, 0],
  [-0.5, 0, 0, 0.7],
];
const TAPS = [
  [[1, 0.5], [0.6, -0.2, 0.3], [-0.7, 0, 0.4]],
  [[0.2, 0.9], [-1, 0.3], [0.5, 0.3, 0.1]],
];
const NOISE = [0.05, 0.1];

function system(): Recording {
  const sources = [11, 12, 13, 14].map((seed) => gaussianNoise(seed, N));
  const x = A.map((row) => add(...row.map((a, m) => scale(sources[m], a))));
  const y = TAPS.map((paths, o) =>
    add(...paths.map((taps, i) => fir(x[i], taps)), scale(gaussianNoise(21 + o, N), NOISE[o]))
  );
  return {
    rate: RATE,
    startTime: 0,
    channels: [
      ...x.map((data, i) => ({ name: `mount_${i + 1}`, unit: "N", data })),
      ...y.map((data, o) => ({ name: `cabin_${o + 1}`, unit: "Pa", data })),
    ],
  };
}

describe("multiple-input FRFs of a known 3-input, 2-output system", async () => {
  const recording = system();
  const { frf, warnings } = await multipleInputFrf(recording, {
    inputs: ["mount_1", "mount_2", "mount_3"],
    outputs: ["cabin_1", "cabin_2"],
    block: BLOCK,
  });
  // Analytic spectra: white noise of variance σ² has the one-sided density 2σ²/fs.
  const white = 2 / RATE;
  const gxx = A.map((ri) => A.map((rj) => white * ri.reduce((s, a, m) => s + a * rj[m], 0)));
  const lines = frf.frequencies.length;
  const inBand = Array.from({ length: lines }, (_, k) => k).filter((k) => k >= 4 && k < lines - 4);

  test("H within 0.2 dB and 2° of the FIR paths where multiple coherence > 0.95", () => {
    // The acceptance limits; the FIR responses are analytic.
    let checked = 0;
    for (let o = 0; o < 2; o++) {
      for (const k of inBand) {
        if (!(frf.multipleCoherence[o][k] > 0.95)) continue;
        for (let i = 0; i < 3; i++) {
          const want = firResponse(TAPS[o][i], frf.frequencies[k], RATE);
          const got = { re: frf.h[o][i].re[k], im: frf.h[o][i].im[k] };
          const db = 20 * Math.log10(Math.hypot(got.re, got.im) / Math.hypot(want.re, want.im));
          let phase = (Math.atan2(got.im, got.re) - Math.atan2(want.im, want.re)) * 180 / Math.PI;
          phase = ((phase + 540) % 360) - 180;
          expect(Math.abs(db), `|H| of ${o}/${i} at ${frf.frequencies[k]} Hz`).toBeLessThan(0.2);
          expect(Math.abs(phase), `phase of ${o}/${i} at ${frf.frequencies[k]} Hz`).toBeLessThan(2);
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(300);
  });

  test("multiple coherence equals its analytic value Gvv/(Gvv + Gnn)", () => {
    for (let o = 0; o < 2; o++) {
      const expected: number[] = [], got: number[] = [];
      for (const k of inBand) {
        const f = frf.frequencies[k];
        // v = Σᵢ Hᵢ·xᵢ = Σₘ (Σᵢ Hᵢ·Aᵢₘ)·sourceₘ: a sum of independent sources.
        let gvv = 0;
        for (let m = 0; m < 4; m++) {
          let re = 0, im = 0;
          for (let i = 0; i < 3; i++) {
            const h = firResponse(TAPS[o][i], f, RATE);
            re += h.re * A[i][m];
            im += h.im * A[i][m];
          }
          gvv += white * (re * re + im * im);
        }
        const gnn = white * NOISE[o] ** 2;
        expected.push(gvv / (gvv + gnn));
        got.push(frf.multipleCoherence[o][k]);
      }
      // Random error of a coherence estimate ≈ √2·(1−γ²)/√nd (Bendat & Piersol
      // eq. 9.82, from memory), nd ≈ 2047 here: 0.01 is over 3 standard errors.
      assertClose(got, expected, { absolute: 0.01, relative: 0 }, `multiple coherence ${o}`);
    }
  });

  test("partial coherence equals |H|²·Gii·r/(|H|²·Gii·r + Gnn), Gii·r from the analytic Gxx", () => {
    const inv = inverse3(gxx);
    for (let o = 0; o < 2; o++) {
      for (let i = 0; i < 3; i++) {
        const conditioned = 1 / inv[i][i];
        const expected: number[] = [], got: number[] = [];
        for (const k of inBand) {
          const h = firResponse(TAPS[o][i], frf.frequencies[k], RATE);
          const through = (h.re ** 2 + h.im ** 2) * conditioned;
          expected.push(through / (through + white * NOISE[o] ** 2));
          got.push(frf.partialCoherence[o][i][k]);
        }
        // The same random error as above: 0.05 is over 3 standard errors for γ² ≥ 0.5.
        assertClose(got, expected, { absolute: 0.05, relative: 0 }, `partial ${o}/${i}`);
      }
      // The conditioned input spectra themselves, against 1/(Gxx⁻¹)ᵢᵢ.
      for (let i = 0; i < 3; i++) {
        const got = inBand.map((k) => frf.conditionedInputs[i][k]);
        assertClose(
          got,
          got.map(() => 1 / inv[i][i]),
          { relative: 0.15, absolute: 0 },
          `Gii·r ${i}`,
        );
      }
    }
  });

  test("the principal components add up to the trace of Gxx (in N²/Hz), and no warning of ill-conditioning", () => {
    const trace = gxx[0][0] + gxx[1][1] + gxx[2][2];
    const sums = inBand.map((k) => frf.principal.reduce((s, pc) => s + pc[k], 0));
    assertClose(sums, sums.map(() => trace), { relative: 0.15, absolute: 0 }, "Σλ");
    expect(warnings.some((w) => w.includes("nearly coherent"))).toBe(false);
    // Virtual coherences of an output add up to its multiple coherence (an identity).
    for (const k of inBand) {
      const sum = frf.virtualCoherence[0].reduce((s, v) => s + v[k], 0);
      assertClose(
        sum,
        frf.multipleCoherence[0][k],
        { relative: 1e-9, absolute: 1e-12 },
        "Σ virtual",
      );
    }
  });
});

describe("principal components count the independent sources", () => {
  test("two sources behind three inputs: two significant components, the third ill-conditioned and flagged", async () => {
    const s1 = gaussianNoise(31, 2 ** 17), s2 = gaussianNoise(32, 2 ** 17);
    const tiny = scale(gaussianNoise(33, 2 ** 17), 1e-3);
    const x3 = add(scale(s1, 0.6), scale(s2, 0.8), tiny);
    const y = add(s1, scale(s2, -2), scale(gaussianNoise(34, 2 ** 17), 0.1));
    const rec: Recording = {
      rate: RATE,
      startTime: 0,
      channels: [
        { name: "a", unit: "N", data: s1 },
        { name: "b", unit: "N", data: s2 },
        { name: "c", unit: "N", data: x3 },
        { name: "y", unit: "Pa", data: y },
      ],
    };
    const { frf, warnings } = await multipleInputFrf(rec, {
      inputs: ["a", "b", "c"],
      outputs: ["y"],
      block: 256,
    });
    const white = 2 / RATE;
    for (let k = 2; k < frf.frequencies.length - 2; k++) {
      const largest = frf.principal[0][k];
      // Significant: within 20 dB of the largest (common practice for a count of sources).
      const significant = frf.principal.filter((pc) => pc[k] > largest / 100).length;
      expect(significant, `at ${frf.frequencies[k]} Hz`).toBe(2);
      // Eigenvalues of (2/fs)·[[1,0,.6],[0,1,.8],[.6,.8,1]] are 2/fs·{2, 1, 0} (+ 1e-6 noise).
      assertClose(frf.principal[0][k], 2 * white, { relative: 0.1, absolute: 0 }, "λ1");
      assertClose(frf.principal[1][k], white, { relative: 0.1, absolute: 0 }, "λ2");
      expect(frf.condition[k]).toBeGreaterThan(1000);
    }
    expect(warnings.some((w) => w.includes("nearly coherent"))).toBe(true);
  });

  test("an input that is the sum of two others: a clear error naming the inputs", async () => {
    const a = gaussianNoise(41, 8192), b = gaussianNoise(42, 8192);
    const rec: Recording = {
      rate: RATE,
      startTime: 0,
      channels: [
        { name: "a", unit: "N", data: a },
        { name: "b", unit: "N", data: b },
        { name: "sum", unit: "N", data: add(a, b) },
        { name: "y", unit: "Pa", data: a },
      ],
    };
    await expect(multipleInputFrf(rec, { inputs: ["a", "b", "sum"], outputs: ["y"], block: 256 }))
      .rejects.toThrow(/linearly dependent/);
  });

  test("with correlated inputs a single-input H1 is biased by more than 1 dB; the matrix H is not", async () => {
    const rec = system();
    const single = await frequencyResponse(rec, {
      input: "mount_1",
      outputs: ["cabin_1"],
      block: BLOCK,
    });
    const { frf } = await multipleInputFrf(rec, {
      inputs: ["mount_1", "mount_2", "mount_3"],
      outputs: ["cabin_1"],
      block: BLOCK,
    });
    const k = 100;
    const truth = firResponse(TAPS[0][0], frf.frequencies[k], RATE);
    const db = (re: number, im: number) =>
      Math.abs(20 * Math.log10(Math.hypot(re, im) / Math.hypot(truth.re, truth.im)));
    expect(db(single.frf.channels[0].re![k], single.frf.channels[0].im![k])).toBeGreaterThan(1);
    expect(db(frf.h[0][0].re[k], frf.h[0][0].im[k])).toBeLessThan(0.2);
  });
});
