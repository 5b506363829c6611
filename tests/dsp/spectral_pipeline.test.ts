import { describe, expect, test } from "vitest";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { SpectralAccumulator } from "../../lib/dsp/spectral_core.ts";
import { spectralSink } from "../../lib/dsp/spectral_pipeline.ts";
import { QuiverError } from "../../lib/errors.ts";
import { gaussianNoise } from "../helpers/random.ts";

// The worker runs the same accumulator on the same samples in the same order, so the
// estimate must be identical to the last bit, not merely close (spectral_pipeline.ts).
describe("the spectral core in a worker", () => {
  test("gives the in-thread estimate exactly, through chunks longer than a slot", async () => {
    const length = 300_000; // longer than one 65 536-row slot: pushed in pieces
    const a = gaussianNoise(41, length), b = gaussianNoise(42, length);
    const options = { rate: 2048, block: 1024, overlap: 0.75, pairs: [[0, 1]] as const };
    const here = new SpectralAccumulator(2, options);
    const sink = spectralSink(2, options, { thread: "worker" });
    for (const [from, to] of [[0, 7], [7, 250_007], [250_007, length]]) {
      const chunk = [a.subarray(from, to), b.subarray(from, to)];
      here.push(chunk);
      sink.push(chunk);
    }
    const expected = here.finish();
    const got = await sink.finish();
    expect(got.averages).toBe(expected.averages);
    expect(Array.from(got.auto[0])).toEqual(Array.from(expected.auto[0]));
    expect(Array.from(got.auto[1])).toEqual(Array.from(expected.auto[1]));
    expect(Array.from(got.cross[0].re)).toEqual(Array.from(expected.cross[0].re));
    expect(Array.from(got.cross[0].im)).toEqual(Array.from(expected.cross[0].im));
  });

  test("a record shorter than a block fails as in the thread, with the same message", async () => {
    const options = { rate: 1000, block: 4096 };
    let inThread = "";
    try {
      const here = new SpectralAccumulator(1, options);
      here.push([new Float64Array(100)]);
      here.finish();
    } catch (e) {
      inThread = (e as Error).message;
    }
    const sink = spectralSink(1, options, { thread: "worker" });
    sink.push([new Float64Array(100)]);
    const error = await sink.finish().catch((e) => e);
    expect(error).toBeInstanceOf(QuiverError);
    expect(error.message).toBe(inThread);
    expect(inThread).toMatch(/longer than the record/);
  });

  test("impossible options are refused before a worker starts", () => {
    expect(() => spectralSink(1, { rate: 1000, block: 256, overlap: 1 }, { thread: "worker" }))
      .toThrow(RangeError);
  });

  test("cancel stops the worker after a failed read", () => {
    const sink = spectralSink(1, { rate: 1000, block: 256 }, { thread: "worker" });
    sink.push([new Float64Array(1000)]);
    sink.cancel();
  });

  test("averagedSpectrum writes the same table from a worker as from this thread", async () => {
    const recording = {
      rate: 4096,
      startTime: 0,
      channels: [0, 1, 2].map((c) => ({
        name: `acc${c}`,
        unit: "m/s^2",
        data: gaussianNoise(50 + c, 200_000),
      })),
    };
    const here = await averagedSpectrum(recording, { block: 2048, thread: "here" });
    const worker = await averagedSpectrum(recording, { block: 2048, thread: "worker" });
    expect(worker.metadata).toEqual(here.metadata);
    worker.columns.forEach((column, i) => {
      expect(Array.from(column.values)).toEqual(Array.from(here.columns[i].values));
    });
  });
});
