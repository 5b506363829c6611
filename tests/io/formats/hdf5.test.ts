import { mkdtemp } from "node:fs/promises";
import h5wasm, { type File as H5File } from "h5wasm/node";
import { describe, expect, test } from "vitest";
import { sniffRecording } from "../../../lib/io/formats/mod.ts";
import { collectRecording, openRecordingStream } from "../../../lib/io/recording_stream.ts";
import { assertClose } from "../../helpers/assert_close.ts";
import { fixturePath, readJsonFixture } from "../../helpers/fixtures.ts";
import { gaussianNoise } from "../../helpers/random.ts";

/** numpy's statements of the samples (tests/reference/make_hdf5_reference.py), not quiver's reading. */
interface Summary {
  n: number;
  first: number[];
  last: number;
  sum: number;
  at_1000: number;
}
const ref = readJsonFixture<{
  files: Record<string, Record<string, unknown>>;
}>("reference/hdf5_reference.json");
const file = (name: string) => fixturePath(`recordings/hdf5/${name}`);
const summaryOf = (name: string, key: string) => ref.files[name][key] as Summary;

/** A channel's samples against numpy's summary: first three, sample 1000, last, sum. */
function expectSamples(data: Float64Array, s: Summary, factor = 1): void {
  expect(data.length).toBe(s.n);
  // The samples are the file's doubles (or float32 widened exactly): equal but for the factor.
  const tight = { relative: 1e-15, absolute: 0 };
  assertClose(Array.from(data.subarray(0, 3)), s.first.map((v) => v * factor), tight, "first");
  assertClose(data[1000], s.at_1000 * factor, tight, "sample 1000");
  assertClose(data[data.length - 1], s.last * factor, tight, "last");
  let sum = 0;
  for (const v of data) sum += v;
  // The sum in another order than numpy's pairwise one: rounding of 2048 terms.
  assertClose(sum, s.sum * factor, { relative: 1e-12, absolute: 1e-9 }, "sum");
}

const G = 9.80665; // standard gravity, m/s² per g (ISO 80000-3)

describe("HDF5 recordings (fixtures written by h5py)", () => {
  test("a group's 1-D datasets are its channels; the rate on the group; units at the dataset, g read as m/s²", async () => {
    const rec = await collectRecording(
      await openRecordingStream(file("two_groups.h5"), { group: "road" }),
    );
    expect(rec.rate).toBe(1024);
    expect(rec.startTime).toBe(0);
    expect(rec.channels.map((c) => [c.name, c.unit])).toEqual([
      ["acc_x", "m/s^2"],
      ["acc_y", "m/s^2"],
    ]);
    expectSamples(rec.channels[0].data, summaryOf("two_groups.h5", "acc_x"), G);
  });

  test("the rate as an attribute of each dataset; a gzip+shuffle chunked float32 dataset and an int16 one", async () => {
    const rec = await collectRecording(
      await openRecordingStream(file("two_groups.h5"), { group: "/rig/" }),
    );
    expect(rec.rate).toBe(2048);
    expect(rec.channels.map((c) => [c.name, c.unit])).toEqual([["accel", "m/s^2"], [
      "force",
      "N",
    ]]);
    expectSamples(rec.channels[0].data, summaryOf("two_groups.h5", "accel"));
    expectSamples(rec.channels[1].data, summaryOf("two_groups.h5", "force"));
  });

  test("describe lists every group with its channels, length and rate, and the text dataset not read", async () => {
    const format = await sniffRecording(file("two_groups.h5"));
    expect(format.name).toBe("hdf5");
    const d = await format.describe(file("two_groups.h5"), { group: "rig" });
    const groups = ref.files["two_groups.h5"].groups as Record<
      string,
      { rate: number; samples: number; channels: string[]; units: string[] }
    >;
    expect(d.groups?.map((g) => [g.name, g.samples, g.rate, g.channels.map((c) => c.name)]))
      .toEqual(
        Object.entries(groups).sort(([a], [b]) => a < b ? -1 : 1).map((
          [name, g],
        ) => [name, g.samples, g.rate, g.channels]),
      );
    expect(d.channels.map((c) => c.unit)).toEqual(groups["/rig"].units);
    expect(d.rateFrom).toBe("the sample_rate attribute of dataset /rig/accel");
    expect(d.unsupported).toEqual(["/rig/notes: text"]);
  });

  test("several groups and none named: refused (usage), listing each with channels, rate and length", async () => {
    const error = await openRecordingStream(file("two_groups.h5")).catch((e) => e);
    expect(error.kind).toBe("usage");
    expect(error.message).toBe(
      `${
        file("two_groups.h5")
      }: the file holds several groups with datasets: /rig (2 channels, 2048 Hz, 2048 samples), /road (2 channels, 1024 Hz, 2048 samples); name one with --group`,
    );
    await expect(openRecordingStream(file("two_groups.h5"), { group: "/bus" })).rejects.toThrow(
      "the file holds no group /bus; groups with datasets: /rig",
    );
  });

  test("a time dataset gives the rate and the start; --rate must agree with it", async () => {
    const s = await openRecordingStream(file("time_dataset.h5"));
    const r = ref.files["time_dataset.h5"] as { rate: number; start: number };
    // (n − 1) / (t_last − t_first) of times 10 + i/1024 written by numpy: 1024 Hz to rounding.
    assertClose(s.rate, r.rate, { relative: 1e-12, absolute: 0 }, "rate");
    expect(s.startTime).toBe(r.start);
    expectSamples(
      (await collectRecording(s)).channels[0].data,
      summaryOf("time_dataset.h5", "mic"),
    );
    expect((await openRecordingStream(file("time_dataset.h5"), { rate: 1024 })).rate).toBe(1024);
    await expect(openRecordingStream(file("time_dataset.h5"), { rate: 1000 })).rejects.toThrow(
      "--rate 1000 Hz disagrees with the time dataset /log/time_s: 1024 Hz",
    );
  });

  test("a 2-D gzip dataset of samples × channels: names from channel_names, units from a list, rate from the root", async () => {
    const rec = await collectRecording(await openRecordingStream(file("matrix.h5")));
    const r = ref.files["matrix.h5"] as { rate: number; channels: string[] };
    expect(rec.rate).toBe(r.rate);
    expect(rec.channels.map((c) => c.name)).toEqual(r.channels);
    expect(rec.channels.map((c) => c.unit)).toEqual(["m/s^2", "m/s^2", "m/s^2"]);
    expectSamples(rec.channels[0].data, summaryOf("matrix.h5", "front"));
    expectSamples(rec.channels[2].data, summaryOf("matrix.h5", "seat"), G);
    // One channel of three read: the same samples.
    const s = await openRecordingStream(file("matrix.h5"));
    const seat: number[] = [];
    await s.read([2], ([c]) => seat.push(c[1000]));
    assertClose(seat[0], summaryOf("matrix.h5", "seat").at_1000 * G, {
      relative: 1e-15,
      absolute: 0,
    });
  });

  test("mixed lengths in a group are refused, naming the datasets and their lengths", async () => {
    const error = await openRecordingStream(file("mixed_lengths.h5")).catch((e) => e);
    expect(error.kind).toBe("data");
    expect(error.message).toBe(
      `${
        file("mixed_lengths.h5")
      }: group /bad holds datasets of different lengths: long (120), short (100) samples; quiver reads datasets of one length as one recording`,
    );
  });

  test("a compressed chunk that does not inflate: refused naming the dataset and the chunk's samples", async () => {
    const r = ref.files["bad_chunk.h5"] as { first: number; last: number };
    const s = await openRecordingStream(file("bad_chunk.h5"));
    await expect(s.read([0], () => {})).rejects.toThrow(
      `${
        file("bad_chunk.h5")
      }: dataset /run/acc: the chunk of samples ${r.first}–${r.last} cannot be read: filter returned failure during read (a deflate chunk that does not inflate)`,
    );
  });

  test("a truncated file: refused with the length it holds and the one it declares", async () => {
    const r = ref.files["truncated.h5"] as { holds: number; declares: number };
    await expect(openRecordingStream(file("truncated.h5"))).rejects.toThrow(
      `${
        file("truncated.h5")
      }: HDF5 cannot open the file: truncated: the file holds ${r.holds} bytes, its superblock declares ${r.declares}`,
    );
  });
});

describe("MAT v7.3 (h5py imitating MATLAB's layout)", () => {
  test("row and column vectors are channels; the rate from fs agrees with the time vector t", async () => {
    const format = await sniffRecording(file("recording.mat"));
    expect(format.name).toBe("mat73");
    const rec = await collectRecording(await openRecordingStream(file("recording.mat")));
    const r = ref.files["recording.mat"] as { rate: number; channels: string[] };
    expect(rec.rate).toBe(r.rate);
    expect(rec.channels.map((c) => c.name)).toEqual(r.channels);
    expectSamples(rec.channels[0].data, summaryOf("recording.mat", "acc"));
    expectSamples(rec.channels[1].data, summaryOf("recording.mat", "mic"));
  });

  test("describe lists text, logical and struct variables as not read; --group is refused", async () => {
    const d = await (await sniffRecording(file("recording.mat"))).describe(
      file("recording.mat"),
      {},
    );
    expect(d.rateFrom).toBe("the variable fs");
    expect(d.samples).toBe(2048);
    expect(d.unsupported).toEqual(["label: text (char)", "ok: logical values", "meta: a struct"]);
    await expect(openRecordingStream(file("recording.mat"), { group: "/" })).rejects.toThrow(
      "a MAT v7.3 file holds one recording; do not name a group (--group)",
    );
  });
});

describe("HDF5 read chunk by chunk (files written here through h5wasm)", () => {
  async function write(path: string, build: (f: H5File) => void): Promise<void> {
    await h5wasm.ready;
    const f = new h5wasm.File(path, "w");
    try {
      build(f);
    } finally {
      f.close();
    }
  }

  test("a record of several read chunks and many gzip chunks comes back sample for sample", async () => {
    const dir = await mkdtemp("/tmp/quiver-hdf5-");
    const n = 150_001; // three read chunks of 65 536 and a part
    const x = gaussianNoise(33, n);
    const t = new Float64Array(n).map((_, i) => 5 + i / 4096);
    await write(`${dir}/long.h5`, (f) => {
      const g = f.create_group("run");
      g.create_dataset({ name: "x", data: x, chunks: [1000], compression: 4 });
      g.create_dataset({ name: "time", data: t });
    });
    const rec = await collectRecording(await openRecordingStream(`${dir}/long.h5`));
    assertClose(rec.rate, 4096, { relative: 1e-9, absolute: 0 }, "rate");
    expect(rec.startTime).toBe(5);
    expect(rec.channels[0].data).toEqual(x);
  });

  test("a time step off the rate is refused at its sample, across a read chunk's edge", async () => {
    const dir = await mkdtemp("/tmp/quiver-hdf5-");
    const n = 70_000;
    const t = new Float64Array(n).map((_, i) => i / 1000);
    // Sample 65 536 starts the second read chunk: 5 % of a step late there.
    for (let i = 65_536; i < n; i++) t[i] += 0.05e-3;
    await write(`${dir}/jump.h5`, (f) => {
      f.create_dataset({ name: "a", data: new Float64Array(n) });
      f.create_dataset({ name: "time_s", data: t });
    });
    const s = await openRecordingStream(`${dir}/jump.h5`);
    await expect(s.read([0], () => {})).rejects.toThrow(
      "time dataset /time_s, sample 65536: the step from 65.535 s to 65.53605 s is not 1/",
    );
  });

  test("a sample that is not finite is refused, naming the dataset and the sample", async () => {
    const dir = await mkdtemp("/tmp/quiver-hdf5-");
    const a = new Float32Array(100);
    a[42] = NaN;
    await write(`${dir}/nan.h5`, (f) => {
      f.create_dataset({ name: "a", data: a }).create_attribute("sample_rate", 100);
    });
    const s = await openRecordingStream(`${dir}/nan.h5`);
    expect(s.rate).toBe(100);
    await expect(s.read([0], () => {})).rejects.toThrow(
      "dataset /a, sample 42: NaN is not a finite number",
    );
  });

  test("no rate anywhere: refused (usage) asking for --rate; --rate then reads it", async () => {
    const dir = await mkdtemp("/tmp/quiver-hdf5-");
    await write(`${dir}/norate.h5`, (f) => {
      f.create_dataset({ name: "a", data: new Int32Array([1, 2, 3]) });
    });
    const error = await openRecordingStream(`${dir}/norate.h5`).catch((e) => e);
    expect(error.kind).toBe("usage");
    expect(error.detail).toBe(
      "no sample rate in the file (no sample_rate attribute, no time dataset) for its root: give --rate HZ",
    );
    const rec = await collectRecording(await openRecordingStream(`${dir}/norate.h5`, { rate: 10 }));
    expect(Array.from(rec.channels[0].data)).toEqual([1, 2, 3]);
  });
});
