import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import { randomError } from "../../lib/frf/estimators.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import type { Table } from "../../lib/io/table.ts";
import { assertClose, maxAbs } from "../helpers/assert_close.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";
import { gaussianNoise } from "../helpers/random.ts";

interface FrfReference {
  rate_hz: number;
  block: number;
  input: string;
  frequencies: number[];
  responses: Record<string, Record<string, number[]>>;
}
const reference = readJsonFixture<FrfReference>("reference/frf_reference.json");
const shaker = parseCsvRecording(
  readFileSync(fixturePath("recordings/shaker_random_3ch.csv"), "utf8"),
  { rate: reference.rate_hz },
);
const column = (table: Table, name: string) => {
  const c = table.columns.find((col) => col.name === name);
  if (c === undefined) throw new Error(`no column ${name}`);
  return c.values;
};

describe("FRF estimators equal their definitions evaluated with scipy.signal", () => {
  // Reference: fixtures/reference/frf_reference.json (tests/reference/make_frf_reference.py):
  // H1 = csd(x,y)/welch(x), H2 = welch(y)/csd(y,x), coherence = scipy.signal.coherence.
  for (const estimator of ["h1", "h2", "hv"] as const) {
    test(`${estimator} and coherence to 1e-4 relative`, async () => {
      const { table } = await frequencyResponse(shaker, {
        input: "table_force",
        outputs: ["arm_acc", "bracket_acc"],
        estimator,
        block: reference.block,
      });
      assertClose(column(table, "frequency_hz"), reference.frequencies, {
        relative: 1e-12,
        absolute: 0,
      });
      for (const [name, ref] of Object.entries(reference.responses)) {
        const re = ref[`${estimator}_re`];
        const im = ref[`${estimator}_im`];
        const scale = maxAbs(re) + maxAbs(im);
        assertClose(
          column(table, `${name}_re`),
          re,
          { relative: 1e-4, absolute: 1e-10 * scale },
          `${name} re`,
        );
        assertClose(
          column(table, `${name}_im`),
          im,
          { relative: 1e-4, absolute: 1e-10 * scale },
          `${name} im`,
        );
        assertClose(column(table, `${name}_coherence`), ref.coherence, {
          relative: 1e-4,
          absolute: 1e-12,
        }, "γ²");
      }
    });
  }

  test("|H1| ≤ |Hv| ≤ |H2| on every line (Hv lies between the two)", async () => {
    const mags = [];
    for (const estimator of ["h1", "hv", "h2"] as const) {
      mags.push(column(
        (await frequencyResponse(shaker, {
          input: "table_force",
          outputs: ["bracket_acc"],
          estimator,
          block: 256,
        })).table,
        "bracket_acc_mag",
      ));
    }
    for (let k = 0; k < mags[0].length; k++) {
      expect(mags[0][k]).toBeLessThanOrEqual(mags[1][k] * (1 + 1e-12));
      expect(mags[1][k]).toBeLessThanOrEqual(mags[2][k] * (1 + 1e-12));
    }
  });
});

describe("coherence", () => {
  const x = gaussianNoise(101, 32768);
  // A linear system: a three-tap filter (analytic: coherence of a noise-free LTI system is 1).
  const y = x.map((v, i) => 0.8 * v + 0.3 * (x[i - 1] ?? 0) - 0.2 * (x[i - 2] ?? 0));
  const rec = (response: Float64Array) => ({
    rate: 1000,
    startTime: 0,
    channels: [
      { name: "force", unit: "N", data: x },
      { name: "acc", unit: "m/s^2", data: response },
    ],
  });

  test("is 1 for a noise-free linear system", async () => {
    // Bendat & Piersol, Random Data, eq. 6.38: γ² = 1 for a noise-free constant-parameter
    // linear system. Periodic-random excitation (common practice): each block's response
    // is the steady state, a circular convolution, so Y = H·X holds exactly per line.
    const block = 512;
    const taps = [0.8, 0.3, -0.2, 0.05];
    const circular = x.map((_, i) => {
      const start = i - (i % block);
      return taps.reduce((sum, t, j) => sum + t * x[start + ((i - start - j + block) % block)], 0);
    });
    const { table } = await frequencyResponse(rec(circular), {
      input: "force",
      outputs: ["acc"],
      block,
      overlap: 0,
      window: "rectangular",
      detrend: "none",
    });
    const g2 = column(table, "acc_coherence");
    assertClose(g2, new Float64Array(g2.length).fill(1), { relative: 0, absolute: 1e-12 });
    expect(maxAbs(column(table, "acc_random_error"))).toBeLessThan(1e-6);
  });

  test("falls to S/(S+N) where uncorrelated noise is added", async () => {
    // Bendat & Piersol, Random Data, eq. 9.57: γ² = Gvv/(Gvv + Gnn) with output noise n.
    const noise = gaussianNoise(102, x.length);
    const noisy = y.map((v, i) => v + noise[i]);
    const { table } = await frequencyResponse(rec(noisy), {
      input: "force",
      outputs: ["acc"],
      block: 512,
    });
    const g2 = column(table, "acc_coherence");
    const f = column(table, "frequency_hz");
    const rate = 1000;
    for (let k = 5; k < g2.length - 5; k += 16) {
      const w = 2 * Math.PI * f[k] / rate;
      const re = 0.8 + 0.3 * Math.cos(w) - 0.2 * Math.cos(2 * w);
      const im = -0.3 * Math.sin(w) + 0.2 * Math.sin(2 * w);
      const signal = re * re + im * im; // Gvv/Gxx with unit-variance white input
      const expected = signal / (signal + 1);
      // 63 averages: the estimate scatters by about ±0.1 around its mean (B&P eq. 9.82).
      assertClose(g2[k], expected, { relative: 0, absolute: 0.15 }, `γ²(${f[k]} Hz)`);
    }
  });

  test("warns that one average makes coherence meaningless", async () => {
    const short = {
      rate: 1000,
      startTime: 0,
      channels: [
        { name: "force", unit: "N", data: x.subarray(0, 512) },
        { name: "acc", unit: "m/s^2", data: y.subarray(0, 512) },
      ],
    };
    const { warnings, table } = await frequencyResponse(short, {
      input: "force",
      outputs: ["acc"],
      block: 512,
    });
    expect(warnings.join()).toMatch(/only one average/);
    expect((table.metadata.warnings as string[]).length).toBe(1);
  });
});

describe("random error of |H| at intermediate coherence", () => {
  // Bendat & Piersol, Random Data, 4th ed., Table 9.6: ε[|Ĥ|] ≈ √(1 − γ²)/(|γ|·√(2·n_d)).
  test("γ² = 0.5 with 32 averages: ε = 1/8 (the formula evaluated by hand)", () => {
    // √0.5/(√0.5·√64) = 1/8; without the factor 2 it would read 1/√32 ≈ 0.177.
    assertClose(randomError(new Float64Array([0.5]), 32), [0.125], {
      relative: 1e-12,
      absolute: 0,
    });
    // γ² = 0.8, 50 averages: √0.2/(√0.8·10) = 0.05.
    assertClose(randomError(new Float64Array([0.8]), 50), [0.05], { relative: 1e-12, absolute: 0 });
  });

  test("equals the scatter of |H1| over independent runs where γ² ≈ 0.5", async () => {
    // y = x + n, x and n independent unit white noise: H = 1 and γ² = 1/2 on every line
    // (B&P eq. 9.57). 40 runs of 32 rectangular, non-overlapping blocks of 64 samples: each
    // run's lines 2…29 are independent estimates of |H|; their relative standard deviation is
    // the random error. 1120 estimates give the standard deviation to about ±2 % (standard
    // error of a standard deviation, 1/√(2N)); the formula is itself a first-order
    // approximation, so 12 % is allowed, and the factor-2 slip (+41 %) cannot pass.
    const block = 64, averages = 32;
    const magnitudes: number[] = [];
    const predicted: number[] = [];
    for (let run = 0; run < 40; run++) {
      const x = gaussianNoise(1000 + run, block * averages);
      const n = gaussianNoise(2000 + run, block * averages);
      const { table } = await frequencyResponse({
        rate: 64,
        startTime: 0,
        channels: [
          { name: "force", unit: "N", data: x },
          { name: "acc", unit: "m/s^2", data: x.map((v, i) => v + n[i]) },
        ],
      }, {
        input: "force",
        outputs: ["acc"],
        block,
        overlap: 0,
        window: "rectangular",
        detrend: "none",
      });
      expect(table.metadata.averages).toBe(averages);
      const re = column(table, "acc_re"), im = column(table, "acc_im");
      const error = column(table, "acc_random_error");
      for (let k = 2; k < 30; k++) {
        magnitudes.push(Math.hypot(re[k], im[k]));
        predicted.push(error[k]);
      }
    }
    let mean = 0;
    for (const m of magnitudes) mean += m / magnitudes.length;
    let variance = 0;
    for (const m of magnitudes) variance += (m - mean) ** 2 / (magnitudes.length - 1);
    // The formula at the true coherence, 1/2: ε = 1/8.
    assertClose(Math.sqrt(variance) / mean, 0.125, { relative: 0.12, absolute: 0 }, "scatter");
    // The table's own ε (from each line's estimated γ²) scatters around the same value.
    let meanPredicted = 0;
    for (const e of predicted) meanPredicted += e / predicted.length;
    assertClose(meanPredicted, 0.125, { relative: 0.12, absolute: 0 }, "mean tabulated ε");
  });
});
