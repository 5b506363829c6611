import { describe, expect, test } from "vitest";
import { SpectralAccumulator } from "../../lib/dsp/spectral_core.ts";
import {
  channelGroups,
  spectralEstimateOf,
  spectralSink,
} from "../../lib/dsp/spectral_pipeline.ts";
import { QuiverError } from "../../lib/errors.ts";
import {
  openRecordingStream,
  recordingSource,
  reopenRecordingStream,
  streamRecipe,
} from "../../lib/io/recording_stream.ts";
import { encodeWav } from "../../lib/io/wav.ts";
import { wavLayout } from "../../lib/io/wav_layout.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { mkdtemp, readFile, utimes, writeFile } from "node:fs/promises";

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

// A stream opened from a WAV file is opened again by the worker, which reads and decodes
// its own channels; each channel's samples are the same, so its spectrum is bit-identical.
describe("workers that read their own channels from the file", () => {
  /** A float32 WAV of four noise channels, one with a DC offset; its path. */
  async function noiseWav(length: number, poison?: { channel: number; sample: number }) {
    const dir = await mkdtemp("/tmp/quiver-pipeline-");
    const channels = [70, 71, 72, 73].map((seed, c) => {
      const data = gaussianNoise(seed, length).map((v) => 0.1 * v + (c === 2 ? 0.5 : 0));
      if (poison?.channel === c) data[poison.sample] = NaN;
      return { name: `ch${c + 1}`, unit: "FS", data };
    });
    const path = `${dir}/run.wav`;
    await writeFile(path, encodeWav({ rate: 8192, startTime: 0, channels }, "float32"));
    return path;
  }

  test("WAV files carry a recipe; CSV files, MDF 4 files and streams in memory none", async () => {
    const wav = await noiseWav(1000);
    expect(streamRecipe(await openRecordingStream(wav))?.path).toBe(wav);
    const sliced = await openRecordingStream(wav, { start: 0.01, end: 0.1 });
    expect(streamRecipe(sliced)?.options).toEqual({ start: 0.01, end: 0.1 });
    const dir = await mkdtemp("/tmp/quiver-pipeline-");
    await writeFile(`${dir}/r.csv`, "time_s,a [V]\n0,1\n0.001,2\n0.002,3\n");
    expect(streamRecipe(await openRecordingStream(`${dir}/r.csv`))).toBeUndefined();
    const mdf4 = new URL("../../fixtures/recordings/mdf4/sorted_dt.mf4", import.meta.url).pathname;
    expect(streamRecipe(await openRecordingStream(mdf4))).toBeUndefined();
    const memory = recordingSource({
      rate: 10,
      startTime: 0,
      channels: [{ name: "a", unit: "V", data: new Float64Array(8) }],
    });
    expect(streamRecipe(memory)).toBeUndefined();
  });

  test("give the one-thread estimate and warnings exactly, for a slice and a shuffled order", async () => {
    const wav = await noiseWav(300_000);
    for (const read of [{}, { start: 3.5, end: 30 }]) {
      const stream = await openRecordingStream(wav, read);
      const options = { rate: 8192, block: 2048, overlap: 0.75 };
      const one = await spectralEstimateOf(stream, [3, 0, 2, 1], options, { threads: 1 });
      const two = await spectralEstimateOf(stream, [3, 0, 2, 1], options, { threads: 2 });
      // The DC offset of ch3 is warned of, at its place in the channel order.
      expect(one.warnings.length).toBe(1);
      expect(one.warnings[0]).toMatch(/"ch3"/);
      expect(two.warnings).toEqual(one.warnings);
      expect(two.estimate.averages).toBe(one.estimate.averages);
      two.estimate.auto.forEach((a, c) => {
        expect(Array.from(a)).toEqual(Array.from(one.estimate.auto[c]));
      });
    }
  });

  test("a fault in a worker's channels is reported as in one thread", async () => {
    // Channels [0, 1] in the order read: this thread takes one, the worker the other.
    const wav = await noiseWav(50_000, { channel: 1, sample: 40_000 });
    const stream = await openRecordingStream(wav);
    const options = { rate: 8192, block: 1024 };
    const one = await spectralEstimateOf(stream, [0, 1], options, { threads: 1 }).catch((e) => e);
    const two = await spectralEstimateOf(stream, [0, 1], options, { threads: 2 }).catch((e) => e);
    expect(one).toBeInstanceOf(QuiverError);
    expect(one.message).toMatch(/channel ch2, sample 40000: NaN is not a finite number/);
    expect(two).toBeInstanceOf(QuiverError);
    expect(two.message).toBe(one.message);
    // A channel that is not read is not decoded, so its NaN concerns no result.
    const other = await spectralEstimateOf(stream, [0, 2], options, { threads: 2 });
    expect(other.estimate.auto.length).toBe(2);
  });

  test("faults in both threads' channels: the first in file order, as one thread meets it", async () => {
    // The worker's channel (ch2) fails at sample 100, this thread's (ch1) only at 150 000.
    const wav = await noiseWav(200_000, { channel: 1, sample: 100 });
    const bytes = await readFile(wav);
    const { dataStart } = wavLayout(bytes, bytes.length);
    new DataView(bytes.buffer, bytes.byteOffset).setFloat32(dataStart + 150_000 * 16, NaN, true);
    await writeFile(wav, bytes);
    const stream = await openRecordingStream(wav);
    const options = { rate: 8192, block: 1024 };
    const one = await spectralEstimateOf(stream, [0, 1], options, { threads: 1 }).catch((e) => e);
    const two = await spectralEstimateOf(stream, [0, 1], options, { threads: 2 }).catch((e) => e);
    expect(one.message).toMatch(/channel ch2, sample 100: NaN/);
    expect(two).toBeInstanceOf(QuiverError);
    expect(two.message).toBe(one.message);
  });

  test("a channel read twice with a set-up factor: each position scaled once", async () => {
    const wav = await noiseWav(100_000);
    const setup = `${wav}.setup.json`;
    await writeFile(
      setup,
      JSON.stringify({
        channels: { ch1: { unit: "Pa", full_scale_volts: 2, sensitivity_mv_per_unit: 50 } },
      }),
    );
    const stream = await openRecordingStream(wav, { setup });
    const options = { rate: 8192, block: 1024 };
    const alone = await spectralEstimateOf(stream, [0], options, { threads: 1 });
    for (const threads of [1, 2]) {
      const twice = await spectralEstimateOf(stream, [0, 0], options, { threads });
      for (const auto of twice.estimate.auto) {
        expect(Array.from(auto)).toEqual(Array.from(alone.estimate.auto[0]));
      }
    }
  });

  test("a set-up changed after the recording was opened is refused, naming it", async () => {
    const wav = await noiseWav(1000);
    const setup = `${wav}.setup.json`;
    await writeFile(setup, JSON.stringify({ channels: { ch1: { name: "mic" } } }));
    const recipe = streamRecipe(await openRecordingStream(wav, { setup }))!;
    await utimes(setup, new Date(), new Date(Date.now() + 5000));
    await expect(reopenRecordingStream(recipe)).rejects.toThrow(
      /run\.wav\.setup\.json: the file changed while it was read/,
    );
  });

  test("a file changed after it was opened is refused, not read as another record", async () => {
    const wav = await noiseWav(1000);
    const recipe = streamRecipe(await openRecordingStream(wav))!;
    expect((await reopenRecordingStream(recipe)).length).toBe(1000);
    await utimes(wav, new Date(), new Date(Date.now() + 5000));
    await expect(reopenRecordingStream(recipe)).rejects.toThrow(
      /run\.wav: the file changed while it was read/,
    );
  });
});
