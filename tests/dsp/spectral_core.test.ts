import { maxOf } from "../../lib/extent.ts";
import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { SpectralAccumulator, spectralEstimate } from "../../lib/dsp/spectral_core.ts";
import { autoSpectrum } from "../../lib/dsp/spectrum_kinds.ts";
import type { WindowName } from "../../lib/dsp/windows.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { QuiverError } from "../../lib/errors.ts";
import { assertClose, maxAbs } from "../helpers/assert_close.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";
import { gaussianNoise, uniformGenerator } from "../helpers/random.ts";

interface WelchCase {
  name: string;
  block: number;
  overlap: number;
  noverlap: number;
  window: WindowName;
  detrend: "none" | "mean" | "linear";
  kind: "psd" | "power" | "rms" | "peak";
  average: "linear" | "exponential" | "max";
  averages: number;
  tau_s?: number;
  frequencies: number[];
  channels: Record<string, number[]>;
}
interface WelchReference {
  cases: WelchCase[];
  cross: { block: number; frequencies: number[]; re: number[]; im: number[] };
}

const reference = readJsonFixture<WelchReference>("reference/welch_reference.json");
const recording = parseCsvRecording(
  readFileSync(fixturePath("recordings/bench_shaker_2ch.csv"), "utf8"),
);

describe("spectra equal scipy.signal's Welch estimate", () => {
  // Reference: scipy.signal.welch/spectrogram, fixtures/reference/welch_reference.json
  // (tests/reference/make_welch_reference.py). Lines below 1e-10 of the peak are negligible.
  for (const c of reference.cases) {
    test(`${c.name}: ${c.kind}, ${c.window}, block ${c.block}, ${c.average} average`, async () => {
      const table = await averagedSpectrum(recording, {
        block: c.block,
        overlap: c.overlap,
        window: c.window,
        detrend: c.detrend,
        kind: c.kind,
        average: c.average,
        ...(c.tau_s !== undefined ? { tau: c.tau_s } : {}),
      });
      expect(table.metadata.averages).toBe(c.averages);
      expect(table.metadata.overlap_samples).toBe(c.noverlap);
      assertClose(table.columns[0].values, c.frequencies, { relative: 1e-12, absolute: 0 }, "f");
      for (const [i, name] of ["drive_force", "mount_acc"].entries()) {
        const expected = c.channels[name];
        assertClose(table.columns[i + 1].values, expected, {
          relative: 1e-6,
          absolute: 1e-10 * maxAbs(expected),
        }, name);
      }
    });
  }

  test("cross spectrum Gxy = E[X*·Y] equals scipy.signal.csd", () => {
    const x = reference.cross;
    const e = spectralEstimate(recording.channels.map((c) => c.data), {
      rate: recording.rate,
      block: x.block,
      pairs: [[0, 1]],
    });
    const scale = maxAbs(x.re) + maxAbs(x.im);
    assertClose(e.cross[0].re, x.re, { relative: 1e-6, absolute: 1e-10 * scale }, "re");
    assertClose(e.cross[0].im, x.im, { relative: 1e-6, absolute: 1e-10 * scale }, "im");
  });
});

describe("Parseval", () => {
  test("with a rectangular window the PSD integrates to the detrended variance exactly", () => {
    // Parseval's theorem for the DFT (analytic): Σ|X|²/N = Σx².
    const x = gaussianNoise(11, 1024).map((v, i) => 3 * v + 5 + 0.01 * i);
    for (const detrend of ["mean", "linear"] as const) {
      const e = spectralEstimate([x], {
        rate: 500,
        block: 1024,
        window: "rectangular",
        detrend,
      });
      const integral = e.auto[0].reduce((s, g) => s + g, 0) * e.df;
      const d = x.slice();
      const n = d.length;
      const mean = d.reduce((s, v) => s + v, 0) / n;
      if (detrend === "mean") d.forEach((v, i) => (d[i] = v - mean));
      else {
        const c = (n - 1) / 2;
        const slope = d.reduce((s, v, i) => s + (i - c) * v, 0) / (n * (n * n - 1) / 12);
        d.forEach((v, i) => (d[i] = v - mean - slope * (i - c)));
      }
      const variance = d.reduce((s, v) => s + v * v, 0) / n;
      assertClose(integral, variance, { relative: 1e-12, absolute: 0 }, detrend);
    }
  });

  test("with a Hann window and many averages the PSD integrates to the variance", () => {
    // Welch's estimate is unbiased for white noise (Bendat & Piersol, Random
    // Data, sec. 11.5); with 255 averages the integral's random error is well under 1 %.
    const x = gaussianNoise(12, 65536).map((v) => 2 * v);
    const e = spectralEstimate([x], { rate: 2048, block: 512 });
    const integral = e.auto[0].reduce((s, g) => s + g, 0) * e.df;
    const variance = x.reduce((s, v) => s + v * v, 0) / x.length;
    assertClose(integral, variance, { relative: 0.01, absolute: 0 }, "variance");
  });
});

describe("flat-top amplitude", () => {
  test("a tone anywhere between two lines reads its true peak within 0.1 dB and 0.5 %", () => {
    // HFT95's flatness is 0.0044 dB (Heinzel et al. 2002); the requirement is 0.1 dB / 0.5 %.
    const rate = 4096;
    const block = 1024;
    const amplitude = 3.7;
    for (let offset = 0; offset <= 1.0001; offset += 0.05) {
      const f = (100 + offset) * rate / block;
      const x = new Float64Array(8 * block).map((_, i) =>
        amplitude * Math.sin(2 * Math.PI * f * i / rate + 0.3)
      );
      const e = spectralEstimate([x], { rate, block, window: "flattop" });
      const peak = autoSpectrum(e, 0, "peak");
      const read = maxOf(peak.subarray(95, 107));
      expect(Math.abs(20 * Math.log10(read / amplitude))).toBeLessThan(0.1);
      expect(Math.abs(read / amplitude - 1)).toBeLessThan(0.005);
    }
  });
});

describe("the spectral core", () => {
  test("streaming in uneven chunks gives the one-shot result exactly", () => {
    const a = gaussianNoise(21, 10000);
    const b = gaussianNoise(22, 10000);
    const options = { rate: 1000, block: 256, overlap: 0.6, pairs: [[0, 1]] as const };
    const whole = spectralEstimate([a, b], options);
    const acc = new SpectralAccumulator(2, options);
    let at = 0;
    for (const size of [1, 7, 300, 2048, 0, 5000]) {
      acc.push([a.subarray(at, at + size), b.subarray(at, at + size)]);
      at += size;
    }
    acc.push([a.subarray(at), b.subarray(at)]);
    const streamed = acc.finish();
    expect(streamed.averages).toBe(whole.averages);
    expect(Array.from(streamed.auto[1])).toEqual(Array.from(whole.auto[1]));
    expect(Array.from(streamed.cross[0].im)).toEqual(Array.from(whole.cross[0].im));
  });

  test("any chunking from a reused buffer gives the one-shot result exactly", () => {
    // Segments inside a chunk are read in place, straddling ones are stitched from a kept tail;
    // readers reuse their arrays, so the tail must be a copy.
    const a = gaussianNoise(23, 6000);
    const b = gaussianNoise(24, 6000);
    const uniform = uniformGenerator(25);
    for (const overlap of [0, 0.5, 0.6, 0.75]) {
      for (const detrend of ["mean", "linear"] as const) {
        const options = { rate: 1000, block: 128, overlap, detrend, pairs: [[0, 1]] as const };
        const whole = spectralEstimate([a, b], options);
        const acc = new SpectralAccumulator(2, options);
        const reused = [new Float64Array(400), new Float64Array(400)];
        for (let at = 0; at < a.length;) {
          const size = Math.min(a.length - at, Math.floor(uniform() * 400));
          reused[0].set(a.subarray(at, at + size));
          reused[1].set(b.subarray(at, at + size));
          acc.push([reused[0].subarray(0, size), reused[1].subarray(0, size)]);
          reused[0].fill(NaN);
          reused[1].fill(NaN);
          at += size;
        }
        const streamed = acc.finish();
        const label = `overlap ${overlap}, ${detrend}`;
        expect(streamed.averages, label).toBe(whole.averages);
        expect(Array.from(streamed.auto[0]), label).toEqual(Array.from(whole.auto[0]));
        expect(Array.from(streamed.cross[0].re), label).toEqual(Array.from(whole.cross[0].re));
      }
    }
  });

  test("is linear: the spectrum of k·x is k² times that of x", () => {
    // Linearity of the DFT (analytic).
    const x = gaussianNoise(31, 4096);
    const e1 = spectralEstimate([x], { rate: 100, block: 512 });
    const e2 = spectralEstimate([x.map((v) => 3 * v)], { rate: 100, block: 512 });
    assertClose(e2.auto[0], e1.auto[0].map((g) => 9 * g), {
      relative: 1e-12,
      absolute: 1e-15 * maxAbs(e2.auto[0]),
    });
  });

  test("refuses a record shorter than one block", () => {
    expect(() => spectralEstimate([new Float64Array(100)], { rate: 10, block: 128 }))
      .toThrow(QuiverError);
  });

  test("refuses impossible options", () => {
    const x = [new Float64Array(1024)];
    expect(() => spectralEstimate(x, { rate: 10, block: 128, overlap: 1 })).toThrow(RangeError);
    expect(() => spectralEstimate(x, { rate: 10, block: 128, overlap: -0.1 })).toThrow(RangeError);
    expect(() => spectralEstimate(x, { rate: 0, block: 128 })).toThrow(RangeError);
    expect(() => spectralEstimate(x, { rate: 10, block: 4 })).toThrow(RangeError);
    expect(() => spectralEstimate(x, { rate: 10, block: 128, average: "exponential", tau: 0 }))
      .toThrow(RangeError);
    expect(() =>
      spectralEstimate([x[0], x[0]], { rate: 10, block: 128, average: "max", pairs: [[0, 1]] })
    ).toThrow(RangeError);
  });
});
