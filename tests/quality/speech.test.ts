/**
 * `quiver speech` and its analysis: the noise's band levels reach the index
 * as spectrum levels, the streaming path equals one pass over the whole
 * record, and bad input is refused (exit code, one line, output untouched).
 */
import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { speechAnalysis } from "../../lib/quality/speech_analysis.ts";
import type { RecordingStream } from "../../lib/io/recording_stream.ts";
import { encodeWav } from "../../lib/io/wav.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { runQuiver } from "../helpers/cli.ts";

const RATE = 24000;
const SIGMA = 0.02; // Pa r.m.s., white: 60 dB re 20 µPa overall

/** A one-channel stream of `data` in Pa, handed out in chunks of `chunk` samples. */
function chunked(data: Float64Array, chunk: number): RecordingStream {
  return {
    rate: RATE,
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

describe("speech intelligibility of a recording", () => {
  const data = gaussianNoise(32, RATE * 10).map((v) => SIGMA * v);

  test("white noise: every band's spectrum level is the density's, 10 lg(σ²/(fs/2)/p₀²)", async () => {
    const r = await speechAnalysis(chunked(data, 65536));
    const columns = new Map(r.bands.columns.map((c) => [c.name, c.values as Float64Array]));
    // One-sided density of white noise: σ²/(fs/2) per Hz (Parseval); p₀ = 20 µPa (ISO 1683).
    const expected = 10 * Math.log10(SIGMA ** 2 / (RATE / 2) / 20e-6 ** 2);
    // 10 s of noise averaged: the lowest band (about 37 Hz wide) varies by a few tenths of a dB.
    assertClose(columns.get("noise_spectrum")!, new Float64Array(18).fill(expected), {
      relative: 0,
      absolute: 0.5,
    }, "N′");
    expect(r.table.metadata.standard).toMatch(/ANSI S3\.5-1997/);
  });

  test("the streaming path (odd chunks) gives the index of one pass over the whole record", async () => {
    const whole = await speechAnalysis(chunked(data, data.length));
    for (const size of [1000, 4097]) {
      const parts = await speechAnalysis(chunked(data, size));
      assertClose(parts.table.metadata.rows[0].sii!, whole.table.metadata.rows[0].sii!, {
        relative: 1e-12,
        absolute: 0,
      }, `SII in chunks of ${size}`);
    }
  });
});

describe("quiver speech", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-speech-");
    const noise = gaussianNoise(7, RATE * 4).map((v) => 0.01 * v);
    const rows = ["time_s,mic [Pa],seat [m/s^2],v [V]"];
    for (let i = 0; i < noise.length; i++) {
      rows.push(`${i / RATE},${noise[i].toPrecision(9)},${(noise[i] * 3).toPrecision(9)},0.1`);
    }
    await writeFile(`${dir}/cabin.csv`, rows.join("\n") + "\n");
    await writeFile(
      `${dir}/slow.wav`,
      encodeWav({
        rate: 16000,
        startTime: 0,
        channels: [{ name: "ch1", unit: "FS", data: noise.subarray(0, 32000) }],
      }, "float32"),
    );
    await writeFile(
      `${dir}/slow.json`,
      JSON.stringify({
        channels: {
          ch1: { name: "mic", unit: "Pa", full_scale_volts: 1, sensitivity_mv_per_unit: 1000 },
        },
      }),
    );
    await writeFile(`${dir}/out.csv`, "previous\n");
  });

  test("every Pa channel by default; the standard and the note on stderr", async () => {
    const r = runQuiver(
      ["speech", "cabin.csv", "--out", "s.json", "--bands-out", "b.csv"],
      dir,
    );
    expect(r.code).toBe(0);
    const m = JSON.parse(await readFile(`${dir}/s.json`, "utf8")).metadata;
    expect(m.rows.map((x: { channel: string }) => x.channel)).toEqual(["mic"]);
    expect(m.rows[0].sii).toBeGreaterThan(0);
    expect(m.rows[0].sii).toBeLessThan(1);
    expect(m.standard).toMatch(/ANSI S3\.5-1997/);
    const bands = (await readFile(`${dir}/b.csv`, "utf8")).trim().split("\n");
    expect(bands).toHaveLength(1 + 18);
    expect(bands[0]).toMatch(/^channel,center_hz,.*contribution$/);
    expect(r.stderr).toMatch(/mic: SII [0-9.]+ \(ANSI S3\.5-1997/);
    expect(r.stderr).toMatch(/not a certified assessment of speech intelligibility/);
  }, 120_000);

  const bad: [string, string[], number, RegExp][] = [
    ["a channel not in Pa", ["cabin.csv", "--channels", "seat"], 2, /"seat" is in m\/s\^2, not Pa/],
    ["an unknown channel", ["cabin.csv", "--channels", "mick"], 2, /no channel named "mick"/],
    [
      "a rate too low for the 8 kHz band, naming the least",
      ["slow.wav", "--setup", "slow.json"],
      1,
      /sample rate above 17825 Hz .* got 16000 Hz/,
    ],
  ];
  for (const [what, args, code, pattern] of bad) {
    test(`refuses ${what}, writing nothing`, async () => {
      const before = (await readdir(dir)).sort();
      const r = runQuiver(["speech", ...args, "--out", "out.csv"], dir);
      expect(r.code).toBe(code);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("previous\n");
      expect((await readdir(dir)).sort()).toEqual(before);
    }, 120_000);
  }

  test("refuses a recording without a channel in Pa", async () => {
    await writeFile(`${dir}/dry.csv`, "time_s,a [m/s^2]\n0,1\n0.00004,2\n0.00008,3\n");
    const r = runQuiver(["speech", "dry.csv", "--rate", "25000", "--out", "out.csv"], dir);
    expect(r.stderr).toMatch(/no channel in Pa/);
    expect(r.code).toBe(1);
  }, 120_000);
});
