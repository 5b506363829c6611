import { describe, expect, test } from "vitest";
import { SpectralAccumulator } from "../../lib/dsp/spectral_core.ts";
import {
  channelGroups,
  spectralEstimateOf,
  spectralSink,
} from "../../lib/dsp/spectral_pipeline.ts";
import { QuiverError } from "../../lib/errors.ts";
import { recordingSource } from "../../lib/io/recording_stream.ts";
import { gaussianNoise } from "../helpers/random.ts";

// A worker runs the same accumulator code on the same samples of its channels in the same
// order, so the estimate must be identical to the last bit, not merely close
// (spectral_pipeline.ts).
describe("the spectral core shared among threads", () => {
  test("gives the one-thread estimate exactly, pairs renumbered, through chunks longer than a slot", async () => {
    const length = 300_000; // longer than one 65 536-row slot: pushed in pieces
    const channels = [41, 42, 43].map((seed) => gaussianNoise(seed, length));
    // Channel 1 alone, channels 0 and 2 together (their cross spectrum, in both orders).
    const options = {
      rate: 2048,
      block: 1024,
      overlap: 0.75,
      pairs: [[2, 0], [0, 2]] as const,
    };
    expect(channelGroups(3, options.pairs, 2)).toEqual([[1], [0, 2]]);
    const here = new SpectralAccumulator(3, options);
    const sink = spectralSink(3, options, { threads: 2 });
    for (const [from, to] of [[0, 7], [7, 250_007], [250_007, length]]) {
      const chunk = channels.map((c) => c.subarray(from, to));
      here.push(chunk);
      sink.push(chunk);
    }
    const expected = here.finish();
    const got = await sink.finish();
    expect(got.averages).toBe(expected.averages);
    expect(got.frequencies).toEqual(expected.frequencies);
    for (let c = 0; c < 3; c++) {
      expect(Array.from(got.auto[c])).toEqual(Array.from(expected.auto[c]));
    }
    expect(got.cross.map(({ x, y }) => [x, y])).toEqual([[2, 0], [0, 2]]);
    for (let p = 0; p < 2; p++) {
      expect(Array.from(got.cross[p].re)).toEqual(Array.from(expected.cross[p].re));
      expect(Array.from(got.cross[p].im)).toEqual(Array.from(expected.cross[p].im));
    }
  });

  test("channel groups keep pairs together and are as even as the pairs allow", () => {
    expect(channelGroups(5, [], 2)).toEqual([[1, 3], [0, 2, 4]]);
    expect(channelGroups(4, [[0, 1], [1, 2]], 2)).toEqual([[3], [0, 1, 2]]);
    expect(channelGroups(4, [[0, 3]], 3)).toEqual([[1], [2], [0, 3]]);
    expect(channelGroups(3, [[0, 1], [1, 2]], 2)).toEqual([[0, 1, 2]]);
    expect(channelGroups(3, [], 1)).toEqual([[0, 1, 2]]);
  });

  test("a record shorter than a block fails as in one thread, with the same message", async () => {
    const options = { rate: 1000, block: 4096 };
    let inThread = "";
    try {
      const here = new SpectralAccumulator(2, options);
      here.push([new Float64Array(100), new Float64Array(100)]);
      here.finish();
    } catch (e) {
      inThread = (e as Error).message;
    }
    const sink = spectralSink(2, options, { threads: 2 });
    sink.push([new Float64Array(100), new Float64Array(100)]);
    const error = await sink.finish().catch((e) => e);
    expect(error).toBeInstanceOf(QuiverError);
    expect(error.message).toBe(inThread);
    expect(inThread).toMatch(/longer than the record/);
  });

  test("impossible options are refused before a worker starts", () => {
    expect(() => spectralSink(2, { rate: 1000, block: 256, overlap: 1 }, { threads: 2 }))
      .toThrow(RangeError);
  });

  test("frames are refused when shared among threads", () => {
    const frames = { segments: 2, onFrame: () => {} };
    expect(() => spectralSink(2, { rate: 1000, block: 256, frames }, { threads: 2 }))
      .toThrow(/frames cannot be handed out of a worker/);
  });

  test("cancel stops the worker after a failed read", () => {
    const sink = spectralSink(2, { rate: 1000, block: 256 }, { threads: 2 });
    sink.push([new Float64Array(1000), new Float64Array(1000)]);
    sink.cancel();
  });

  test("a recording read through two threads gives the one-thread estimate exactly", async () => {
    const stream = recordingSource({
      rate: 4096,
      startTime: 0,
      channels: [0, 1, 2].map((c) => ({
        name: `acc${c}`,
        unit: "m/s^2",
        data: gaussianNoise(50 + c, 200_000),
      })),
    });
    const options = {
      rate: 4096,
      block: 2048,
      window: "flattop" as const,
      detrend: "linear" as const,
    };
    const one = await spectralEstimateOf(stream, [2, 0, 1], options, { threads: 1 });
    const two = await spectralEstimateOf(stream, [2, 0, 1], options, { threads: 2 });
    expect(two.warnings).toEqual(one.warnings);
    expect(two.estimate.averages).toBe(one.estimate.averages);
    two.estimate.auto.forEach((a, c) => {
      expect(Array.from(a)).toEqual(Array.from(one.estimate.auto[c]));
    });
  });

  test("each thread checks its own channels: the one-thread warnings, in channel order", async () => {
    // A clipped channel with known rails, a DC offset, a dead channel and clean noise: channels
    // 0 and 2 stay in this thread, 1 and 3 go to the worker, and the read order is shuffled.
    const noise = gaussianNoise(60, 100_000);
    const rails = { low: -1, high: 32767 / 32768, step: 1 / 32768 };
    const clipped = noise.map((v) =>
      Math.max(rails.low, Math.min(rails.high, Math.round(v * 16384) / 32768))
    );
    const stream = recordingSource({
      rate: 4096,
      startTime: 0,
      channels: [
        { name: "clean", unit: "V", data: gaussianNoise(61, 100_000) },
        { name: "clipped", unit: "FS", data: clipped, fullScale: rails },
        { name: "offset", unit: "V", data: noise.map((v) => 10 + v) },
        { name: "dead", unit: "V", data: new Float64Array(100_000).fill(0.25) },
      ],
    });
    const options = { rate: 4096, block: 1024 };
    const one = await spectralEstimateOf(stream, [3, 1, 2, 0], options, { threads: 1 });
    const two = await spectralEstimateOf(stream, [3, 1, 2, 0], options, { threads: 2 });
    expect(one.warnings.map((w) => w.split(" ")[1])).toEqual([
      '"dead"',
      '"clipped"',
      '"offset"',
    ]);
    expect(two.warnings).toEqual(one.warnings);
    two.estimate.auto.forEach((a, c) => {
      expect(Array.from(a)).toEqual(Array.from(one.estimate.auto[c]));
    });
  });

  test("rails out of order are refused before reading, in either path", async () => {
    const data = new Float64Array(1000);
    const stream = recordingSource({
      rate: 1000,
      startTime: 0,
      channels: [0, 1].map((c) => ({
        name: `a${c}`,
        unit: "V",
        data,
        fullScale: { low: 1, high: -1 },
      })),
    });
    for (const threads of [1, 2]) {
      await expect(spectralEstimateOf(stream, [0, 1], { rate: 1000, block: 256 }, { threads }))
        .rejects.toThrow(/converter rails must satisfy low < high/);
    }
  });
});
