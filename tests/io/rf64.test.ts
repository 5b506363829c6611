import { readFileSync } from "node:fs";
import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { spectralEstimate } from "../../lib/dsp/spectral_core.ts";
import { autoSpectrum } from "../../lib/dsp/spectrum_kinds.ts";
import { QuiverError } from "../../lib/errors.ts";
import { sniffRecording } from "../../lib/io/formats/mod.ts";
import { collectRecording, openRecordingStream } from "../../lib/io/recording_stream.ts";
import { parseWav } from "../../lib/io/wav.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";

interface Rf64Reference {
  files: Record<string, { container: string; rate: number; channels: number[][] }>;
}
// tests/reference/make_rf64_reference.py: headers by hand from EBU Tech 3306 / ITU-R BS.2088,
// samples by numpy, expected values = codes / 2^(bits-1).
const reference = readJsonFixture<Rf64Reference>("reference/rf64_reference.json");
const pathOf = (name: string) => fixturePath(`recordings/rf64/${name}.wav`);
const bytesOf = (name: string) => new Uint8Array(readFileSync(pathOf(name)));

describe("RF64 and BW64 files (WAV beyond 4 GB), written from the specifications", () => {
  for (const [name, expected] of Object.entries(reference.files)) {
    test(`${name}: streamed and in memory, the samples the script wrote`, async () => {
      const stream = await openRecordingStream(pathOf(name));
      expect(stream.rate).toBe(expected.rate);
      const rec = await collectRecording(stream);
      const whole = parseWav(bytesOf(name), name);
      expect(rec.channels.length).toBe(expected.channels.length);
      rec.channels.forEach((c, i) => {
        expect(c.name).toBe(`ch${i + 1}`);
        // Exact: the codes scaled by a power of two (make_rf64_reference.py).
        assertClose(c.data, expected.channels[i], { relative: 0, absolute: 0 }, c.name);
        assertClose(whole.channels[i].data, expected.channels[i], { relative: 0, absolute: 0 });
      });
      const described = await (await sniffRecording(pathOf(name))).describe(pathOf(name), {});
      expect(described.container).toBe(expected.container);
      expect(described.samples).toBe(expected.channels[0].length);
    });
  }

  test("the same samples as CSV and as RF64 give the same spectrum to 1e-9 relative", async () => {
    // make_rf64_reference.py writes rf64_float64_same.csv with the float64 file's samples (repr).
    const wav = await collectRecording(await openRecordingStream(pathOf("rf64_float64")));
    const csv = await collectRecording(
      await openRecordingStream(fixturePath("recordings/rf64/rf64_float64_same.csv")),
    );
    expect(csv.rate).toBe(wav.rate);
    const options = { rate: wav.rate, block: 128 };
    const a = spectralEstimate(wav.channels.map((c) => c.data), options);
    const b = spectralEstimate(csv.channels.map((c) => c.data), options);
    for (let c = 0; c < 2; c++) {
      assertClose(autoSpectrum(a, c, "psd"), autoSpectrum(b, c, "psd"), {
        relative: 1e-9,
        absolute: 0,
      }, `channel ${c + 1}`);
    }
  });
});

describe("RF64 sizes past 4 GiB are 64-bit numbers, not 32-bit ints", () => {
  test("a sparse 5 GiB RF64 file opens with its frame count from ds64", async () => {
    // The fixture's header (make_rf64_reference.py) with ds64's sizes raised to 5 GiB of data,
    // then the file extended sparse to that size: 5 GiB / 8-byte frames (2 × float32).
    const head = bytesOf("rf64_float32").slice(0, 12 + 36 + 24 + 8);
    const v = new DataView(head.buffer);
    const data = 5 * 2 ** 30;
    const dataStart = head.length; // ds64 (8 + 28), fmt (8 + 16), data tag (8) after byte 12
    expect(String.fromCharCode(...head.subarray(dataStart - 8, dataStart - 4))).toBe("data");
    v.setBigUint64(20, BigInt(dataStart - 8 + data), true);
    v.setBigUint64(28, BigInt(data), true);
    const dir = await mkdtemp("/tmp/quiver-rf64-big-");
    const path = `${dir}/big.wav`;
    await writeFile(path, head);
    const { truncate } = await import("node:fs/promises");
    await truncate(path, dataStart + data);
    const stream = await openRecordingStream(path);
    expect(stream.length).toBe(data / 8);
    expect(stream.length / stream.rate).toBe(data / 8 / 4096);
    const { rm } = await import("node:fs/promises");
    await rm(dir, { recursive: true });
  });
});

describe("bad RF64 headers are refused, naming the file, the chunk and its offset", () => {
  const good = bytesOf("rf64_pcm16");
  const refuse = (bytes: Uint8Array, pattern: RegExp) => {
    let error: unknown;
    try {
      parseWav(bytes, "x.wav");
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(QuiverError);
    expect((error as QuiverError).message).toMatch(/^x\.wav: /);
    expect((error as QuiverError).detail).toMatch(pattern);
  };
  const edit = (f: (v: DataView, b: Uint8Array) => void) => {
    const b = good.slice();
    f(new DataView(b.buffer), b);
    return b;
  };
  // EBU Tech 3306 §3: ds64 follows "RF64<size>WAVE" at byte 12; its size field at 16,
  // riffSize at 20, dataSize at 28, sampleCount at 36, tableLength at 44.
  test("ds64 cut short", () => refuse(good.subarray(0, 30), /truncated ds64 chunk at byte 12/));
  test("no ds64 chunk first", () =>
    refuse(edit((_, b) => b.set([0x4a, 0x55, 0x4e, 0x4b], 12)), /ds64 chunk first, at byte 12/));
  test("ds64 shorter than its fields", () =>
    refuse(edit((v) => v.setUint32(16, 20, true)), /ds64 chunk at byte 12: 20 bytes/));
  test("a table longer than the chunk", () =>
    refuse(edit((v) => v.setUint32(44, 9, true)), /ds64 chunk at byte 12: its table of 9/));
  test("a data size past the end of the file", () =>
    refuse(
      edit((v) => v.setBigUint64(28, 2n ** 33n, true)),
      /data size \(8589934592 bytes\) is larger than the RIFF size|truncated/,
    ));
  test("a data size past the end of the file (RIFF size raised too)", () =>
    refuse(
      edit((v) => {
        v.setBigUint64(20, 2n ** 34n, true);
        v.setBigUint64(28, 2n ** 33n, true);
      }),
      /^truncated: the data chunk declares 8589934592 bytes but the file holds \d+ after its header \(the chunk is at byte \d+\)$/,
    ));
  test("a chunk of size 0xFFFFFFFF the table does not give", () =>
    refuse(
      edit((v) => v.setUint32(44, 0, true)),
      /chunk "LIST" at byte \d+ has the size 0xFFFFFFFF, but the ds64 chunk's table does not give it/,
    ));

  test("quiver info and spectrum: exit 1, one line naming the file and the chunk", async () => {
    const dir = await mkdtemp("/tmp/quiver-rf64-");
    const path = `${dir}/cut.wav`;
    await writeFile(path, good.subarray(0, 30));
    for (const args of [["info", path], ["spectrum", path, "--out", `${dir}/o.csv`]]) {
      const r = runQuiver(args);
      expect(r.code).toBe(1);
      expect(r.stderr.trim().split("\n").length).toBe(1);
      expect(r.stderr).toContain(`${path}: truncated ds64 chunk at byte 12`);
    }
  }, 120_000);
});
