import { describe, expect, test } from "vitest";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { spectrogram } from "../../lib/dsp/spectrogram.ts";
import { segmentMetadata } from "../../lib/dsp/segment_metadata.ts";
import { spectralEstimate } from "../../lib/dsp/spectral_core.ts";

// Result files are compared byte for byte across releases: the key order of each result's
// segmenting is part of its format. The orders below are those of the result files written
// before the one writer existed (the demo's road_psd.json and cabin_spectrogram.json).
const recording = {
  rate: 1024,
  startTime: 0,
  channels: [{
    name: "a",
    unit: "V",
    data: new Float64Array(8192).map((_, i) => Math.sin(2 * Math.PI * 100 * i / 1024)),
  }],
};

describe("the segmenting every averaging analysis writes", () => {
  test("a spectrum's keys, in the order its files have always had", async () => {
    const { metadata } = await averagedSpectrum(recording, { block: 256 });
    expect(Object.keys(metadata)).toEqual([
      "analysis",
      "kind",
      "rate_hz",
      "block",
      "df_hz",
      "overlap",
      "overlap_samples",
      "averages",
      "average",
      "window",
      "window_source",
      "window_coherent_gain",
      "window_enbw_bins",
      "enbw_hz",
      "detrend",
      "record_samples",
      "record_start_s",
      "warnings",
      "channels",
    ]);
    // 8192 samples, blocks of 256 every 128: (8192 − 256)/128 + 1 = 63 segments.
    expect(metadata.averages).toBe(63);
    expect(metadata.overlap_samples).toBe(128);
    // The periodic Hann window: coherent gain 1/2, noise bandwidth 1.5 lines (Harris 1978).
    expect(metadata.window_coherent_gain).toBeCloseTo(0.5, 12);
    expect(metadata.window_enbw_bins).toBeCloseTo(1.5, 12);
    expect(metadata.enbw_hz).toBeCloseTo(1.5 * 1024 / 256, 9);
  });

  test("exponential averaging adds its time constant right after the averaging mode", async () => {
    const { metadata } = await averagedSpectrum(recording, {
      block: 256,
      average: "exponential",
      tau: 0.5,
    });
    const keys = Object.keys(metadata);
    expect(keys.slice(keys.indexOf("average"), keys.indexOf("average") + 3))
      .toEqual(["average", "tau_s", "window"]);
    expect(metadata.tau_s).toBe(0.5);
  });

  test("a spectrogram's segmenting: no averages, overlap in samples only", async () => {
    const { metadata } = await spectrogram(recording, { block: 512, overlap: 0.25 });
    const keys = Object.keys(metadata);
    expect(keys.slice(0, 9)).toEqual([
      "analysis",
      "against",
      "layout",
      "rate_hz",
      "block",
      "df_hz",
      "overlap_samples",
      "window",
      "detrend",
    ]);
    expect([metadata.df_hz, metadata.overlap_samples, metadata.window, metadata.detrend])
      .toEqual([2, 128, "hann", "mean"]);
  });

  test("the writer gives the keys asked for, in their order, and leaves out an absent tau", () => {
    const e = spectralEstimate([new Float64Array(160).map((_, i) => Math.cos(i))], {
      rate: 100,
      block: 40,
      overlap: 0.5,
      window: "rectangular",
      detrend: "none",
    });
    const m = segmentMetadata(e, [
      "detrend",
      "tau_s",
      "averages",
      "rate_hz",
      "window_coherent_gain",
    ]);
    // (160 − 40)/20 + 1 = 7 segments; a rectangular window's coherent gain is 1.
    expect(m).toEqual({ detrend: "none", averages: 7, rate_hz: 100, window_coherent_gain: 1 });
    expect(Object.keys(m)).toEqual(["detrend", "averages", "rate_hz", "window_coherent_gain"]);
  });
});
