import { readFileSync } from "node:fs";
import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { spectralEstimate } from "../../lib/dsp/spectral_core.ts";
import { autoSpectrum } from "../../lib/dsp/spectrum_kinds.ts";
import { sniffRecording } from "../../lib/io/formats/mod.ts";
import { decodeChars, MI } from "../../lib/io/mat5_elements.ts";
import { collectRecording, openRecordingStream } from "../../lib/io/recording_stream.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";
import { mat5File } from "../helpers/mat5_write.ts";

interface Mat5Reference {
  files: Record<string, {
    rate: number;
    rate_from: string;
    channels: Record<string, number[]>;
    units: Record<string, string>;
    not_read: string[];
  }>;
}
// tests/reference/make_mat5_reference.py: files by scipy.io.savemat (one big-endian by hand),
// expected values by scipy.io.loadmat reading them back.
const reference = readJsonFixture<Mat5Reference>("reference/mat5_reference.json");
const pathOf = (name: string) => fixturePath(`recordings/mat/${name}.mat`);

describe("MAT v5 files written by scipy.io.savemat (and one big-endian by hand)", () => {
  for (const [name, want] of Object.entries(reference.files)) {
    test(`${name}: channels, units, rate and what is not read, as scipy.io.loadmat finds them`, async () => {
      const path = pathOf(name);
      const format = await sniffRecording(path);
      expect(format.name).toBe("mat5");
      const described = await format.describe(path, {});
      expect(described.rate).toBe(want.rate);
      expect(described.rateFrom).toBe(want.rate_from);
      expect(described.channels.map((c) => c.name)).toEqual(Object.keys(want.channels));
      for (const c of described.channels) {
        const owner = c.name.replace(/_\d+$/, "");
        expect(c.unit).toBe(want.units[c.name] ?? want.units[owner] ?? "");
      }
      for (const n of want.not_read) {
        expect(described.unsupported?.some((u) => u.startsWith(`variable "${n}"`))).toBe(true);
      }
      const rec = await collectRecording(await openRecordingStream(path));
      expect(rec.rate).toBe(want.rate);
      rec.channels.forEach((c) => {
        // Exact: the same stored numbers (int16/int32/float32 widened to float64 exactly).
        // Units N, m/s^2 and none are SI base units already: read with factor 1.
        assertClose(c.data, want.channels[c.name], {
          relative: 0,
          absolute: 0,
        }, c.name);
      });
    });
  }

  test("the same samples as CSV and as MAT v5 (plain and compressed) give the same spectrum to 1e-9 relative", async () => {
    // make_mat5_reference.py writes shaker_f64_same.csv with shaker_f64.mat's samples (repr).
    const csv = await collectRecording(
      await openRecordingStream(fixturePath("recordings/mat/shaker_f64_same.csv")),
    );
    const options = { rate: csv.rate, block: 128 };
    const expected = spectralEstimate(csv.channels.map((c) => c.data), options);
    for (const name of ["shaker_f64", "shaker_f64_z"]) {
      const mat = await collectRecording(await openRecordingStream(pathOf(name)));
      expect(mat.rate).toBe(csv.rate);
      const got = spectralEstimate(mat.channels.map((c) => c.data), options);
      for (let c = 0; c < 2; c++) {
        assertClose(autoSpectrum(got, c, "psd"), autoSpectrum(expected, c, "psd"), {
          relative: 1e-9,
          absolute: 0,
        }, `${name} channel ${c + 1}`);
      }
    }
  });

  test("long vectors stream across chunk boundaries, plain and compressed", async () => {
    // Values i·0.5 (exact in binary): every sample's place is checked.
    const dir = await mkdtemp("/tmp/quiver-mat5-");
    const n = 200_003;
    const a = new Float64Array(n).map((_, i) => i * 0.5);
    const b = new Float64Array(n).map((_, i) => -i);
    for (const compress of [false, true]) {
      const path = `${dir}/long_${compress}.mat`;
      await writeFile(
        path,
        mat5File([{ name: "fs", values: new Float64Array([2000]) }, { name: "a", values: a }, {
          name: "b",
          values: b,
        }], compress),
      );
      const stream = await openRecordingStream(path, { start: 10, end: 60 });
      const rec = await collectRecording(stream);
      expect(rec.channels[0].data.length).toBe(100_000);
      expect(rec.channels[0].data[0]).toBe(20_000 * 0.5);
      expect(rec.channels[1].data[99_999]).toBe(-119_999);
    }
  });
});

describe("MAT v5: the time vector and quiver info", () => {
  const writeMat = async (variables: { name: string; values: Float64Array }[]) => {
    const dir = await mkdtemp("/tmp/quiver-mat5-t-");
    await writeFile(`${dir}/r.mat`, mat5File(variables, false));
    return `${dir}/r.mat`;
  };
  const a = new Float64Array(5000).map((_, i) => Math.sin(i));

  test("a time vector 10 + i/3000 s gives the nominal 3000 Hz and its first value as the start", async () => {
    // (n − 1)/span of times 10 + i/3000 is 3000 Hz but for rounding of the doubles (analytic);
    // measured from float64 times it is 2999.9999999999986 (numpy 2.4).
    const t = new Float64Array(5000).map((_, i) => 10 + i / 3000);
    const path = await writeMat([{ name: "time", values: t }, { name: "a", values: a }]);
    const d = await (await sniffRecording(path)).describe(path, {});
    expect(d.rate).toBe(3000);
    expect(d.startTime).toBe(10);
    expect(d.rateFrom).toBe('the time vector "time"');
    const both = await writeMat([{ name: "fs", values: new Float64Array([3000]) }, {
      name: "t",
      values: t,
    }, { name: "a", values: a }]);
    const e = await (await sniffRecording(both)).describe(both, {});
    expect(e.rateFrom).toBe('the variable "fs", agreeing with the time vector "t"');
  });

  test("an unnamed variable (MATLAB's subsystem data) is listed as not read, not a channel", async () => {
    const path = await writeMat([{ name: "fs", values: new Float64Array([100]) }, {
      name: "a",
      values: a,
    }, { name: "", values: new Float64Array(7) }]);
    const d = await (await sniffRecording(path)).describe(path, {});
    expect(d.channels.map((c) => c.name)).toEqual(["a"]);
    expect(d.unsupported?.some((u) => u.startsWith('variable "" ') && u.includes("unnamed"))).toBe(
      true,
    );
  });

  test("a gap in the time vector is refused, naming the sample (as a CSV time column's)", async () => {
    // Steps of 1 ms with one of 2 ms at sample 4000: 100 % off the median step, past 1 %.
    const t = new Float64Array(5000).map((_, i) => (i < 4000 ? i : i + 1) / 1000);
    const path = await writeMat([{ name: "t", values: t }, { name: "a", values: a }]);
    await expect(openRecordingStream(path)).rejects.toThrow(
      /the time vector variable "t" \(element at byte 128\): not uniform: the step to sample 4000 is 0\.002 s, the median step 0\.001 s/,
    );
  });

  test(
    "quiver info: format, rate and its source, length, channels with units, what is not read",
    () => {
      // make_mat5_reference.py: 512 samples at 1024 Hz, fs = 1024, units N and m/s^2.
      const path = pathOf("shaker_f64");
      const r = runQuiver(["info", path]);
      expect(r.code).toBe(0);
      const lines = r.stdout.split("\n");
      expect(lines).toContain("format: MAT5");
      expect(lines).toContain('sample rate: 1024 Hz (from the variable "fs")');
      expect(lines).toContain("length: 512 samples, 0.5 s");
      expect(lines).toContain("  variable 1: drive_force [N]");
      expect(lines).toContain("  variable 2: mount_acc [m/s^2]");
      expect(
        lines.some((l) =>
          /^not read: variable "setup" \(element at byte \d+\): a struct array$/.test(l)
        ),
      )
        .toBe(true);
      expect(lines.some((l) => /^not read: variable "operator" .*: a 1×6 char array$/.test(l)))
        .toBe(true);
      const rf64 = runQuiver(["info", fixturePath("recordings/rf64/bw64_pcm24.wav")]).stdout;
      // make_rf64_reference.py: BW64, 4096 Hz, 512 frames.
      expect(rf64).toContain("format: WAV (BW64)\nsample rate: 4096 Hz (from the BW64 header)\n");
    },
    120_000,
  );
});

describe("MAT v5: a long char variable is read whole", () => {
  // 200 000 UTF-16 code units: spread as String.fromCharCode's arguments they overflow V8's
  // stack (as 100 000 do not). Non-ASCII, and a pair of surrogates (U+1D465) across the units.
  const N = 200_000;
  const piece = "m/s² µ° \u{1d465} ";
  const text = piece.repeat(Math.ceil(N / piece.length)).trim(); // at least N units, pairs whole
  const a = new Float64Array(64).map((_, i) => Math.sin(i));

  for (const [type, compress] of [["uint16", false], ["uint16", true], ["utf8", true]] as const) {
    test(`a ${text.length}-character unit as ${type}${compress ? ", compressed" : ""}`, async () => {
      const dir = await mkdtemp("/tmp/quiver-mat5-char-");
      await writeFile(
        `${dir}/c.mat`,
        mat5File([
          { name: "fs", values: new Float64Array([100]) },
          { name: "a", values: a },
          { name: "a_unit", text, type },
        ], compress),
      );
      const d = await (await sniffRecording(`${dir}/c.mat`)).describe(`${dir}/c.mat`, {});
      expect(d.channels.map((c) => c.name)).toEqual(["a"]);
      expect(d.channels[0].unit.length).toBe(text.length);
      expect(d.channels[0].unit === text).toBe(true); // not toBe: its diff would print 200 000 chars
    });
  }

  test("decodeChars: big-endian UTF-16, Latin-1 bytes and UTF-32 code points, each 200 000 long", () => {
    const units = new Uint16Array(N).map((_, i) => [0x6d, 0xb5, 0x20ac, 0xd835, 0xdc65][i % 5]);
    const want = Array.from({ length: N / 5 }, () => "mµ€\u{1d465}").join("");
    const be = new Uint8Array(2 * N);
    const beView = new DataView(be.buffer);
    for (let i = 0; i < N; i++) beView.setUint16(2 * i, units[i], false);
    expect(decodeChars(be, MI.UINT16, false) === want).toBe(true);
    expect(decodeChars(be.subarray(0, 6), MI.UTF16, false)).toBe("mµ€");
    // Latin-1: each byte its own code point, 0x80–0x9F included (not windows-1252).
    const bytes = new Uint8Array(N).map((_, i) => [0x41, 0x80, 0x9f, 0xb5][i % 4]);
    const latin = decodeChars(bytes, MI.UINT8, true);
    expect(latin.length).toBe(N);
    expect(latin === "A\u0080\u009fµ".repeat(N / 4)).toBe(true);
    expect(decodeChars(bytes, MI.INT8, true) === latin).toBe(true);
    const points = new Uint8Array(4 * N);
    const pointsView = new DataView(points.buffer);
    for (let i = 0; i < N; i++) pointsView.setUint32(4 * i, [0x6d, 0xb5, 0x1d465][i % 3], true);
    const utf32 = decodeChars(points, MI.UTF32, true);
    expect(utf32.length).toBe(N + Math.ceil((N - 2) / 3));
    expect(utf32.startsWith("mµ\u{1d465}m")).toBe(true);
    expect(utf32 === "mµ\u{1d465}".repeat(N / 3 | 0) + "mµ".slice(0, N % 3)).toBe(true);
  });
});

describe("bad MAT v5 files are refused, naming the file, the variable or element and its offset", () => {
  const plain = new Uint8Array(readFileSync(pathOf("shaker_f64")));
  const packed = new Uint8Array(readFileSync(pathOf("shaker_f64_z")));
  const run = async (bytes: Uint8Array, args: string[] = []) => {
    const dir = await mkdtemp("/tmp/quiver-mat5-bad-");
    const path = `${dir}/bad.mat`;
    await writeFile(path, bytes);
    return {
      path,
      r: runQuiver(["spectrum", path, "--block", "64", "--out", `${dir}/o.csv`, ...args]),
    };
  };
  const oneLine = (stderr: string) => expect(stderr.trim().split("\n").length).toBe(1);

  test("a truncated element (the file cut inside a variable): exit 1", async () => {
    const { path, r } = await run(plain.subarray(0, 3000));
    expect(r.code).toBe(1);
    oneLine(r.stderr);
    // The first variable's element starts at byte 128, right after the 128-byte header.
    expect(r.stderr).toMatch(
      new RegExp(
        `${path}: element at byte \\d+: truncated: it declares \\d+ bytes, past the end of the file \\(byte 3000\\)`,
      ),
    );
  }, 120_000);

  test("a size past the end (the first element's byte count raised): exit 1", async () => {
    const b = plain.slice();
    new DataView(b.buffer).setUint32(132, 0x7fff0000, true); // tag at 128: type, then bytes
    const { path, r } = await run(b);
    expect(r.code).toBe(1);
    oneLine(r.stderr);
    expect(r.stderr).toContain(
      `${path}: element at byte 128: truncated: it declares ${0x7fff0000} bytes`,
    );
  }, 120_000);

  test("a compressed element whose zlib header is broken: exit 1 at opening", async () => {
    const b = packed.slice();
    b[136] = 0x00; // the zlib stream's first byte (CMF), after the 8-byte tag at 128 (RFC 1950)
    const { path, r } = await run(b);
    expect(r.code).toBe(1);
    oneLine(r.stderr);
    expect(r.stderr).toContain(`${path}: compressed element at byte 128: it does not inflate`);
  }, 120_000);

  test(
    "a compressed element corrupted inside its data: info reads its header; spectrum exit 1 naming the variable",
    async () => {
      const b = packed.slice();
      for (let i = 600; i < 700; i++) b[i] ^= 0x5a; // inside drive_force's deflate stream
      const { path, r } = await run(b);
      expect(runQuiver(["info", path]).code).toBe(0);
      expect(r.code).toBe(1);
      oneLine(r.stderr);
      expect(r.stderr).toMatch(
        new RegExp(
          `${path}: variable "drive_force" \\(compressed element at byte 128\\): it does not inflate`,
        ),
      );
    },
    120_000,
  );

  test("vectors of different lengths: exit 1 naming both", () => {
    const path = pathOf("mixed_lengths");
    const r = runQuiver(["info", path]);
    expect(r.code).toBe(1);
    oneLine(r.stderr);
    // make_mat5_reference.py: a has 512 samples, b 511.
    expect(r.stderr).toMatch(
      /vectors of different lengths: variable "a" \(element at byte 128\) holds 512 samples, variable "b" \(element at byte \d+\) 511/,
    );
  }, 120_000);

  test("--rate that contradicts the file's fs: exit 2; no rate at all: exit 2", async () => {
    const r = runQuiver(["info", pathOf("shaker_f64"), "--rate", "1000"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('the variable "fs" gives a rate of 1024 Hz, but 1000 Hz was given');
    const agreeing = runQuiver(["info", pathOf("shaker_f64"), "--rate", "1024"]);
    expect(agreeing.stdout).toContain(
      'sample rate: 1024 Hz (from --rate, agreeing with the variable "fs")',
    );
    const { r: none } = await run(mat5File([{ name: "a", values: new Float64Array(8) }], false));
    expect(none.code).toBe(2);
    expect(none.stderr).toContain("no sample rate");
  }, 120_000);
});
