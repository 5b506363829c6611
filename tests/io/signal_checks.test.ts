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

  test("clipping: flat tops at the extremes, with the true count of samples at the rails", () => {
    // An overdriven sine: a converter holding ±2 for every sample beyond (3·sin clipped at 2).
    const x = new Float64Array(20000).map((_, i) =>
      Math.max(-2, Math.min(2, 3 * Math.sin(2 * Math.PI * i / 200)))
    );
    // The count, from the signal's definition: samples where |3·sin| ≥ 2.
    let atRails = 0;
    for (let i = 0; i < 20000; i++) {
      if (Math.abs(3 * Math.sin(2 * Math.PI * i / 200)) >= 2) atRails++;
    }
    const warning = channelWarnings(channel(x)).join();
    expect(warning).toMatch(/clipped/);
    expect(warning).toContain(`${atRails} samples`);
    expect(channelWarnings(channel(gaussianNoise(3, 20000))).join()).not.toMatch(/clipped/);
  });

  test("a clean TTL tacho is a two-level signal, not clipping", () => {
    // 0/5 V, 40 % duty, 25 samples per pulse (common practice: TTL tachometer output).
    const tacho = new Float64Array(50000).map((_, i) => (i % 25 < 10 ? 5 : 0));
    expect(channelWarnings({ name: "tacho", unit: "V", data: tacho }).join()).not.toMatch(
      /clipped/,
    );
  });

  test("a force channel resting on an exact-zero baseline is not clipping", () => {
    // Half-sine hits of 1 ms at 8192 Hz every 0.5 s, zero in between.
    const force = new Float64Array(8192 * 5).map((_, i) => {
      const t = (i % 4096) / 8192;
      return t < 0.001 ? 200 * Math.sin(Math.PI * t / 0.001) : 0;
    });
    expect(channelWarnings({ name: "hammer", unit: "N", data: force }).join()).not.toMatch(
      /clipped/,
    );
  });

  test("a clipped noise-like accelerometer is found: flat runs that cut the waveform", () => {
    // Road vibration, noise-like, overdriving a ±1 input: flat runs entered continuously.
    const raw = gaussianNoise(9, 40000);
    const x = raw.map((v) => Math.max(-1, Math.min(1, 0.8 * v)));
    expect(channelWarnings(channel(x)).join()).toMatch(/clipped/);
  });

  test("a DC offset large against the signal", () => {
    const x = gaussianNoise(4, 5000).map((v) => 10 + 0.5 * v);
    expect(channelWarnings(channel(x)).join()).toMatch(/DC offset of 10/);
  });

  test("the warnings travel with a spectrum's metadata", async () => {
    const rec = { rate: 1000, startTime: 0, channels: [channel(new Float64Array(4096).fill(1))] };
    expect(((await averagedSpectrum(rec, { block: 512 })).metadata.warnings as string[]).join())
      .toMatch(
        /constant/,
      );
  });

  test("an FRF band with low coherence is warned about", async () => {
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
    const { warnings } = await frequencyResponse(rec, {
      input: "force",
      outputs: ["acc"],
      block: 256,
    });
    expect(warnings.join()).toMatch(/coherence of "acc" is below 0\.5/);
    // The band's ends to 4 significant figures, not df = 1000/256 = 3.90625 Hz in full.
    expect(warnings).toContain(
      'coherence of "acc" is below 0.5 in 1 band(s) (3.906–500 Hz): the FRF is not to be trusted there',
    );
  });
});

describe("numbers in the warnings are rounded and carry the channel's unit", () => {
  test("a DC offset: mean and standard deviation in the channel's unit", () => {
    // Alternating 10.1 and 9.9: mean 10, standard deviation 0.1 (analytic).
    const x = new Float64Array(1000).map((_, i) => (i % 2 === 0 ? 10.1 : 9.9));
    expect(channelWarnings(channel(x))).toEqual([
      'channel "acc" has a DC offset of 10 m/s^2, over 3 times its standard deviation (0.1 m/s^2)',
    ]);
  });

  test("clipping: the rails to 4 significant figures", () => {
    // A sine of amplitude 1 held at ±2/3 (an overdriven input); 2/3 prints as 0.6667.
    const x = new Float64Array(20000).map((_, i) =>
      Math.max(-2 / 3, Math.min(2 / 3, Math.sin(2 * Math.PI * i / 200)))
    );
    expect(channelWarnings(channel(x)).join()).toContain(
      "sit at its extremes (-0.6667, 0.6667 m/s^2)",
    );
  });
});
