import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { encodeWav, parseWav, type WavEncoding } from "../../lib/io/wav.ts";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { QuiverError } from "../../lib/errors.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";
import { gaussianNoise } from "../helpers/random.ts";

interface WavReference {
  files: Record<string, { rate: number; channels: number[][] }>;
}
const reference = readJsonFixture<WavReference>("reference/wav_reference.json");
const bytesOf = (name: string) =>
  new Uint8Array(readFileSync(fixturePath(`recordings/wav/${name}.wav`)));

describe("WAV files written by other software", () => {
  // Reference: scipy.io.wavfile.read of the same files
  // (tests/reference/make_wav_reference.py → fixtures/reference/wav_reference.json).
  for (const [name, expected] of Object.entries(reference.files)) {
    test(`${name} reads as scipy.io.wavfile reads it`, () => {
      const rec = parseWav(bytesOf(name), `${name}.wav`);
      expect(rec.rate).toBe(expected.rate);
      expect(rec.channels.length).toBe(expected.channels.length);
      rec.channels.forEach((c, i) => {
        expect(c.name).toBe(`ch${i + 1}`);
        expect(c.unit).toBe("FS");
        assertClose(c.data, expected.channels[i], { relative: 0, absolute: 0 }, c.name);
      });
    });
  }
});

describe("the chunked WAV reader decodes the channels asked for, in any order", () => {
  // Only the selected channels are decoded (each path: aligned views, sample by sample for
  // 8 and 24 bit); the values must still be scipy's (the same reference as above).
  for (const [name, expected] of Object.entries(reference.files)) {
    test(`${name}: the last channel, then the first`, async () => {
      const stream = await openRecordingStream(fixturePath(`recordings/wav/${name}.wav`));
      const last = expected.channels.length - 1;
      const got: number[][] = [[], []];
      await stream.read(
        [last, 0],
        (chunk) => chunk.forEach((c, j) => c.forEach((v) => got[j].push(v))),
      );
      assertClose(got[0], expected.channels[last], { relative: 0, absolute: 0 }, "last");
      assertClose(got[1], expected.channels[0], { relative: 0, absolute: 0 }, "first");
    });
  }
});

describe("WAV decoding does not depend on where the bytes sit", () => {
  // Aligned frames are read through a typed-array view, others sample by sample: both must give
  // scipy's values (the same reference as above) at every byte offset of the file in memory.
  for (const [name, expected] of Object.entries(reference.files)) {
    test(`${name} at byte offsets 0 to 7`, () => {
      const file = bytesOf(name);
      for (let offset = 0; offset < 8; offset++) {
        const holder = new Uint8Array(file.length + 8);
        holder.set(file, offset);
        const rec = parseWav(holder.subarray(offset, offset + file.length));
        rec.channels.forEach((c, i) => {
          assertClose(c.data, expected.channels[i], { relative: 0, absolute: 0 }, `${offset}`);
        });
      }
    });
  }
});

describe("non-finite float samples are refused wherever the bytes sit", () => {
  // Aligned float frames are checked as they are copied, others after decoding: both name the
  // first non-finite sample in file order (frame by frame, channel by channel).
  const cases: [string, [number, number, number][], RegExp][] = [
    [
      "a later channel's earlier frame first",
      [[0, 7, Infinity], [1, 5, NaN]],
      /ch2, sample 5: NaN/,
    ],
    ["the first channel of a frame first", [[1, 5, NaN], [0, 5, -Infinity]], /ch1, sample 5: -Inf/],
    ["the last sample", [[1, 19, Infinity]], /ch2, sample 19: Infinity is not a finite number/],
  ];
  for (const [what, bad, message] of cases) {
    test(what, () => {
      const data = [0, 1].map((c) => new Float64Array(20).map((_, i) => 0.01 * (i - c)));
      for (const [c, i, v] of bad) data[c][i] = v;
      const rec = {
        rate: 1000,
        startTime: 0,
        channels: data.map((d, c) => ({ name: `ch${c + 1}`, unit: "FS", data: d })),
      };
      const file = encodeWav(rec, "float32");
      for (let offset = 0; offset < 4; offset++) {
        const holder = new Uint8Array(file.length + 4);
        holder.set(file, offset);
        expect(() => parseWav(holder.subarray(offset, offset + file.length), "x.wav")).toThrow(
          message,
        );
      }
    });
  }
});

describe("WAV round trips", () => {
  const encodings: [WavEncoding, number][] = [
    ["pcm16", 2 ** -15],
    ["pcm24", 2 ** -23],
    ["pcm32", 2 ** -31],
    ["float32", 2 ** -24],
  ];
  for (const [encoding, quantum] of encodings) {
    test(`${encoding}: samples come back within half a quantisation step`, () => {
      const data = [0.3, 0.1].map((g, c) =>
        gaussianNoise(40 + c, 999).map((v) => Math.max(-0.99, Math.min(0.99, g * v)))
      );
      const rec = {
        rate: 48000,
        startTime: 0,
        channels: data.map((d, c) => ({ name: `ch${c + 1}`, unit: "FS", data: d })),
      };
      const back = parseWav(encodeWav(rec, encoding));
      expect(back.rate).toBe(48000);
      back.channels.forEach((c, i) => {
        assertClose(c.data, data[i], {
          relative: encoding === "float32" ? quantum : 0,
          absolute: encoding === "float32" ? 0 : quantum / 2,
        });
      });
    });
  }

  test("integer encodings refuse samples beyond full scale instead of clipping", () => {
    const rec = {
      rate: 8000,
      startTime: 0,
      channels: [{ name: "a", unit: "FS", data: new Float64Array([0, 1.2]) }],
    };
    expect(() => encodeWav(rec, "pcm16")).toThrow(RangeError);
  });
});

describe("WAV files that are refused", () => {
  const good = bytesOf("pcm16_stereo");
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

  test("truncated data chunk", () => refuse(good.subarray(0, good.length - 10), /truncated/));
  test("header cut inside the fmt chunk", () =>
    refuse(good.subarray(0, 30), /truncated or malformed fmt|no fmt/));
  test("unsupported encoding (µ-law)", () => {
    const b = good.slice();
    new DataView(b.buffer).setUint16(20, 7, true);
    refuse(b, /unsupported WAV encoding \(format code 7\)/);
  });
  test("unsupported sample size", () => {
    const b = good.slice();
    const v = new DataView(b.buffer);
    v.setUint16(34, 12, true);
    refuse(b, /12 bits/);
  });
  test("not a WAV at all", () =>
    refuse(new TextEncoder().encode("RIFX1234WAVEfmt "), /not a RIFF\/WAVE/));
});
