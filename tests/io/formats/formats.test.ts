import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { formatOf, RECORDING_FORMATS, sniffRecording } from "../../../lib/io/formats/mod.ts";
import { openRecordingStream } from "../../../lib/io/recording_stream.ts";
import { encodeWav } from "../../../lib/io/wav.ts";
import { wavFormat } from "../../../lib/io/formats/wav.ts";
import { mat5Format } from "../../../lib/io/formats/mat5.ts";
import { hdf5Format } from "../../../lib/io/formats/hdf5.ts";
import { mat73Format } from "../../../lib/io/formats/mat73.ts";
import { mdf4Format } from "../../../lib/io/formats/mdf4.ts";

const NOT_RECOGNISED =
  "neither a WAV, MAT v5, HDF5, MAT v7.3 or MDF 4 file nor UTF-8 text; quiver reads CSV, WAV, MAT v5, HDF5, MAT v7.3 and MDF 4 recordings (save a CSV as UTF-8: a header in Latin-1 or Windows-1252, e.g. with µ or °, is not UTF-8)";

describe("the list of recording formats", () => {
  test("names are unique, and a text format is there for files no signature claims", () => {
    const names = RECORDING_FORMATS.map((f) => f.name);
    expect(new Set(names).size).toBe(names.length);
    expect(RECORDING_FORMATS.some((f) => f.kind === "text")).toBe(true);
  });

  test("each binary format's head (signatures.ts, read at start-up) is its format file's", () => {
    // The list's binary entries load their files when first used; they must sniff, be named and
    // open again for a worker (WAV only) as the files do.
    const files = [wavFormat, mat5Format, hdf5Format, mat73Format, mdf4Format];
    const binary = RECORDING_FORMATS.filter((f) => f.kind === "binary");
    expect(binary.map((f) => [f.name, f.label, f.kind, f.sniff, f.opensAgain])).toEqual(
      files.map((f) => [f.name, f.label, f.kind, f.sniff, f.opensAgain]),
    );
    expect(binary.filter((f) => f.opensAgain === true).map((f) => f.name)).toEqual(["wav"]);
    binary.forEach((f, i) => expect(f.sniff).toBe(files[i].sniff));
  });

  test("a file's first bytes choose its format; bytes no signature claims go to CSV", () => {
    const wav = encodeWav({
      rate: 8000,
      startTime: 0,
      channels: [{ name: "a", unit: "FS", data: new Float64Array(8) }],
    }, "pcm16");
    expect(formatOf(wav)?.name).toBe("wav");
    expect(formatOf(new TextEncoder().encode("time_s;a\n0;1\n"))?.name).toBe("csv");
    expect(formatOf(new Uint8Array([0x89, 0x48, 0x44, 0x46, 0, 1, 2]))?.name).toBe("csv");
    expect(formatOf(new Uint8Array(0))?.name).toBe("csv");
  });

  test("a file of no known format: the message names every format, from opening and from info", async () => {
    const dir = await mkdtemp("/tmp/quiver-formats-");
    const path = `${dir}/latin1.csv`;
    // "µ" in Latin-1 is the single byte 0xb5: not UTF-8.
    await writeFile(
      path,
      new Uint8Array([
        ...new TextEncoder().encode("time_s,a ["),
        0xb5,
        0x6d,
        0x5d,
        0x0a,
        0x30,
        0x2c,
        0x31,
        0x0a,
      ]),
    );
    await expect(openRecordingStream(path)).rejects.toThrow(`${path}: ${NOT_RECOGNISED}`);
    const format = await sniffRecording(path);
    await expect(format.describe(path, {})).rejects.toThrow(`${path}: ${NOT_RECOGNISED}`);
  });

  test("describe (quiver info) and open agree on rate, length and channels for each format", async () => {
    const dir = await mkdtemp("/tmp/quiver-formats-");
    await writeFile(`${dir}/r.csv`, "time_s,a [V],b [g]\n0,1,2\n0.25,3,4\n0.5,5,6\n");
    await writeFile(
      `${dir}/r.wav`,
      encodeWav({
        rate: 8000,
        startTime: 0,
        channels: [0, 1, 2].map((c) => ({ name: `c${c}`, unit: "FS", data: new Float64Array(80) })),
      }, "pcm16"),
    );
    const expected = {
      "r.csv": { format: "csv", rate: 4, samples: 3, names: ["a", "b"], positions: [2, 3] },
      "r.wav": {
        format: "wav",
        rate: 8000,
        samples: 80,
        names: ["ch1", "ch2", "ch3"],
        positions: [1, 2, 3],
      },
    };
    for (const [file, want] of Object.entries(expected)) {
      const path = `${dir}/${file}`;
      const format = await sniffRecording(path);
      const described = await format.describe(path, {});
      const stream = await openRecordingStream(path);
      expect(format.name).toBe(want.format);
      expect([described.rate, described.samples]).toEqual([want.rate, want.samples]);
      expect([stream.rate, stream.length]).toEqual([want.rate, want.samples]);
      expect(described.channels.map((c) => c.name)).toEqual(want.names);
      expect(described.channels.map((c) => c.position)).toEqual(want.positions);
      expect(stream.channels.map((c) => c.name)).toEqual(want.names);
    }
  });
});
