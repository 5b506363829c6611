import { describe, expect, test } from "vitest";
import { channelWarnings } from "../../lib/io/signal_checks.ts";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import { gaussianNoise } from "../helpers/random.ts";

const channel = (data: Float64Array) => ({ name: "acc", unit: "m/s^2", data });

describe("signal-level warnings", () => {
  test("a constant channel", () => {
    expect(channelWarnings(channel(new Float64Array(500)))[0]).toMatch(/constant/);
  });

  test("clipping: flat tops at the extremes", () => {
    // An overdriven sine: a converter holding its last code at ±2 for every sample beyond.
    const x = new Float64Array(20000).map((_, i) =>
      Math.max(-2, Math.min(2, 3 * Math.sin(2 * Math.PI * i / 200)))
    );
    expect(channelWarnings(channel(x)).join()).toMatch(/clipped/);
    expect(channelWarnings(channel(gaussianNoise(3, 20000))).join()).not.toMatch(/clipped/);
  });

  test("a DC offset large against the signal", () => {
    const x = gaussianNoise(4, 5000).map((v) => 10 + 0.5 * v);
    expect(channelWarnings(channel(x)).join()).toMatch(/DC offset of 10/);
  });

  test("the warnings travel with a spectrum's metadata", () => {
    const rec = { rate: 1000, startTime: 0, channels: [channel(new Float64Array(4096).fill(1))] };
    expect((averagedSpectrum(rec, { block: 512 }).metadata.warnings as string[]).join()).toMatch(
      /constant/,
    );
  });

  test("an FRF band with low coherence is warned about", () => {
    // The response is mostly uncorrelated noise: γ² = S/(S + N) ≈ 2e-4 (Bendat & Piersol eq. 9.57).
    const x = gaussianNoise(5, 32768);
    const noise = gaussianNoise(7, x.length);
    const response = x.map((v, i) => 0.01 * v + noise[i]);
    const rec = {
      rate: 1000,
      startTime: 0,
      channels: [{ name: "force", unit: "N", data: x }, {
        name: "acc",
        unit: "m/s^2",
        data: response,
      }],
    };
    const { warnings } = frequencyResponse(rec, { input: "force", outputs: ["acc"], block: 256 });
    expect(warnings.join()).toMatch(/coherence of "acc" is below 0\.5/);
  });
});
