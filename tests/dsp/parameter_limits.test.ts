import { describe, expect, test } from "vitest";
import { isPowerOfTwo, MAX_FFT_SIZE, realFftPlan } from "../../lib/dsp/fft.ts";
import { type WindowName, windowSamples } from "../../lib/dsp/windows.ts";
import { blockForResolution, validateSpectralOptions } from "../../lib/dsp/spectral_core.ts";
import type { DetrendMode } from "../../lib/dsp/detrend.ts";

describe("impossible parameters of the signal core are RangeErrors that say what is allowed", () => {
  test("powers of two are told beyond 32 bits (bitwise operators are 32-bit)", () => {
    // 2^32 + 2^31 has (n & (n - 1)) === 0 in 32-bit arithmetic: it used to pass.
    expect(isPowerOfTwo(2 ** 32 + 2 ** 31)).toBe(false);
    expect(isPowerOfTwo(2 ** 32)).toBe(true);
    expect(isPowerOfTwo(2 ** 40)).toBe(true);
    expect(isPowerOfTwo(2 ** 40 + 2)).toBe(false);
    expect(isPowerOfTwo(3 * 2 ** 20)).toBe(false);
  });

  test("a transform longer than MAX_FFT_SIZE is refused before anything is allocated", () => {
    expect(() => realFftPlan(2 ** 32)).toThrow(RangeError);
    expect(() => realFftPlan(MAX_FFT_SIZE + 1)).toThrow(/at most 134217728/);
    expect(() => validateSpectralOptions(1, { rate: 1000, block: 2 ** 30 })).toThrow(
      /block must be an integer from 8 to 134217728 samples, got 1073741824/,
    );
  });

  test("a resolution finer than the largest transform is refused naming the finest", () => {
    expect(() => blockForResolution(1000, 1e-9)).toThrow(RangeError);
    expect(() => blockForResolution(1000, 1e-9)).toThrow(
      new RegExp(`the finest resolution is ${1000 / 2 ** 27} Hz`),
    );
    // At the finest resolution the block is the largest transform exactly.
    expect(blockForResolution(1000, 1000 / 2 ** 27)).toBe(2 ** 27);
  });

  test("an unknown window, detrend or averaging name names the allowed ones", () => {
    expect(() => windowSamples("kaiser" as WindowName, 16)).toThrow(
      'unknown window "kaiser"; expected one of rectangular, hann, hamming, blackman-harris, flattop',
    );
    expect(() => windowSamples("kaiser" as WindowName, 16)).toThrow(RangeError);
    expect(() =>
      validateSpectralOptions(1, { rate: 100, block: 16, window: "kaiser" as WindowName })
    ).toThrow(RangeError);
    expect(() =>
      validateSpectralOptions(1, { rate: 100, block: 16, detrend: "cubic" as DetrendMode })
    ).toThrow(/unknown detrend mode "cubic"|cubic/);
    expect(() =>
      validateSpectralOptions(1, { rate: 100, block: 16, average: "median" as "linear" })
    ).toThrow(/unknown averaging mode "median"; expected one of linear, exponential, max/);
  });
});
