/**
 * `quiver loudness`'s analysis read in chunks gives the numbers of one pass
 * over the whole record, stationary and time-varying, at a rate the method
 * takes as it is (48 kHz) and at one it raises (25.6 kHz, the rate raiser in
 * the path too).
 */
import { describe, expect, test } from "vitest";
import { loudnessAnalysis } from "../../lib/quality/loudness_analysis.ts";
import type { RecordingStream } from "../../lib/io/recording_stream.ts";
import { bandNoise, tones } from "./signals.ts";

/** A one-channel stream of `data` in Pa, handed out in chunks of `chunk` samples. */
function chunked(rate: number, data: Float64Array, chunk: number): RecordingStream {
  return {
    rate,
    startTime: 0,
    length: data.length,
    channels: [{ name: "mic", unit: "Pa" }],
    read(_selected, onChunk) {
      for (let first = 0; first < data.length; first += chunk) {
        onChunk([data.slice(first, Math.min(data.length, first + chunk))]);
      }
      return Promise.resolve();
    },
  };
}

const column = (r: Awaited<ReturnType<typeof loudnessAnalysis>>, name: string) =>
  Array.from(r.table.columns.find((c) => c.name === name)!.values as Float64Array);

describe("the streaming path equals one pass", () => {
  test.each(
    [
      ["stationary", 48000],
      ["stationary", 25600],
      ["time-varying", 48000],
      ["time-varying", 25600],
    ] as const,
  )("%s at %i Hz: chunks of 1000 and 4097 samples", async (method, rate) => {
    // An analytic equality: every filter, the rate raiser, the smoothing and the decay keep their
    // state between chunks, so the numbers are the same to the last bit.
    const x = bandNoise(rate, 1.5, 80, 9000, 62, 17);
    const y = tones(rate, 1.5, [[630, 55]]);
    for (let i = 0; i < x.length; i++) x[i] += i > x.length / 2 ? y[i] : 0; // a tone half-way: N varies
    const run = (chunk: number) =>
      loudnessAnalysis(chunked(rate, x, chunk), { method, history: method === "time-varying" });
    const whole = await run(x.length);
    const names = method === "stationary"
      ? ["loudness", "loudness_level", "sharpness"]
      : ["loudness", "loudness_level", "sharpness", "n5", "n10"];
    for (const chunk of [1000, 4097]) {
      const parts = await run(chunk);
      for (const name of names) {
        expect(column(parts, name), `${name}, ${chunk}`).toEqual(column(whole, name));
      }
      const specific = (r: typeof whole) =>
        Array.from(r.specific.columns[2].values as Float64Array);
      expect(specific(parts)).toEqual(specific(whole));
      if (method === "time-varying") {
        const history = (r: typeof whole) =>
          Array.from(r.history!.columns[1].values as Float64Array);
        expect(history(parts)).toEqual(history(whole));
      }
    }
    expect(column(whole, "loudness")[0]).toBeGreaterThan(1); // not a silent, trivially equal case
  }, 120_000);
});
