import { maxOf } from "../../lib/extent.ts";
import { readFileSync } from "node:fs";
import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { formatCsv } from "../../lib/io/table.ts";
import { encodeWav } from "../../lib/io/wav.ts";
import { assertClose, maxAbs } from "../helpers/assert_close.ts";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";

const shaker = fixturePath("recordings/bench_shaker_2ch.csv");

function wavBytes(): Uint8Array {
  const data = new Float64Array(4096).map((_, i) => 0.5 * Math.sin(i / 3));
  return encodeWav(
    { rate: 8000, startTime: 0, channels: [{ name: "ch1", unit: "FS", data }] },
    "pcm16",
  );
}
function truncatedWav(): Uint8Array {
  return wavBytes().subarray(0, 3000);
}
function mulawWav(): Uint8Array {
  const bytes = wavBytes().slice();
  new DataView(bytes.buffer).setUint16(20, 7, true); // WAVE_FORMAT_MULAW
  return bytes;
}

describe("quiver spectrum", () => {
  test("writes the same table as the library, to stdout by default", async () => {
    const r = runQuiver(["spectrum", shaker, "--block", "256", "--kind", "rms"]);
    expect(r.code).toBe(0);
    const rec = parseCsvRecording(readFileSync(shaker, "utf8"));
    expect(r.stdout).toBe(formatCsv(await averagedSpectrum(rec, { block: 256, kind: "rms" })));
    expect(r.stdout.split("\n")[0]).toBe("frequency_hz,drive_force [N],mount_acc [m/s^2]");
    expect(r.stderr).toMatch(/31 average\(s\) of 256 samples/);
  });

  test("its output equals scipy.signal.welch for a flat-top peak spectrum", () => {
    // Reference: fixtures/reference/welch_reference.json, case flattop_peak.
    const ref = readJsonFixture<{ cases: { name: string; channels: Record<string, number[]> }[] }>(
      "reference/welch_reference.json",
    ).cases.find((c) => c.name === "flattop_peak")!;
    const r = runQuiver([
      "spectrum",
      shaker,
      "--block",
      "512",
      "--window",
      "flattop",
      "--kind",
      "peak",
    ]);
    expect(r.code).toBe(0);
    const rows = r.stdout.trim().split("\n").slice(1).map((l) => l.split(",").map(Number));
    const expected = ref.channels.mount_acc;
    assertClose(rows.map((row) => row[2]), expected, {
      relative: 1e-6,
      absolute: 1e-10 * maxAbs(expected),
    });
  });

  test("JSON output carries the metadata that makes the numbers traceable", async () => {
    const dir = await mkdtemp("/tmp/quiver-cli-");
    const r = runQuiver([
      "spectrum",
      shaker,
      "--resolution",
      "2",
      "--overlap",
      "0.75",
      "--window",
      "hamming",
      "--channels",
      "mount_acc",
      "--out",
      `${dir}/s.json`,
    ]);
    expect(r.code).toBe(0);
    const json = JSON.parse(await readFile(`${dir}/s.json`, "utf8"));
    expect(json.metadata).toMatchObject({
      source: shaker,
      block: 512,
      df_hz: 2,
      window: "hamming",
      overlap: 0.75,
      overlap_samples: 384,
      averages: 29,
      kind: "psd",
    });
    expect(json.columns.map((c: { name: string }) => c.name)).toEqual([
      "frequency_hz",
      "mount_acc",
    ]);
    expect(json.columns[1].unit).toBe("(m/s^2)^2/Hz");
  });

  test("reads WAV recordings, with a channel set-up giving units", async () => {
    const dir = await mkdtemp("/tmp/quiver-cli-");
    const data = new Float64Array(8192).map((_, i) =>
      0.5 * Math.sin(2 * Math.PI * 1000 * i / 8192)
    );
    await writeFile(
      `${dir}/mic.wav`,
      encodeWav(
        { rate: 8192, startTime: 0, channels: [{ name: "ch1", unit: "FS", data }] },
        "pcm24",
      ),
    );
    await writeFile(
      `${dir}/setup.json`,
      JSON.stringify({
        channels: {
          ch1: {
            name: "driver_ear",
            unit: "Pa",
            full_scale_volts: 2,
            sensitivity_mv_per_unit: 50,
            role: "microphone",
          },
        },
      }),
    );
    const r = runQuiver([
      "spectrum",
      `${dir}/mic.wav`,
      "--setup",
      `${dir}/setup.json`,
      "--block",
      "1024",
      "--kind",
      "peak",
      "--window",
      "flattop",
    ]);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split("\n");
    expect(lines[0]).toBe("frequency_hz,driver_ear [Pa]");
    // 0.5 FS · 2 V/FS = 1 V peak; at 50 mV/Pa that is 20 Pa peak (definition of sensitivity).
    const peak = maxOf(lines.slice(1).map((l) => Number(l.split(",")[1])));
    assertClose(peak, 20, { relative: 0.005, absolute: 0 });
  });

  test("--help describes every option", () => {
    const r = runQuiver(["spectrum", "--help"]);
    expect(r.code).toBe(0);
    for (
      const option of [
        "--channels",
        "--block",
        "--resolution",
        "--overlap",
        "--window",
        "--detrend",
        "--kind",
        "--average",
        "--out",
        "--format",
        "--rate",
        "--setup",
      ]
    ) {
      expect(r.stdout).toContain(option);
    }
    expect(runQuiver(["--help"]).stdout).toContain("spectrum");
  });
});

describe("quiver spectrum refuses bad input and writes nothing", () => {
  let dir: string;
  const files: Record<string, string | Uint8Array> = {
    "empty.csv": "",
    "header_only.csv": "time_s,a\n",
    "ragged.csv": "time_s,a,b\n0,1,2\n0.001,1\n",
    "text.csv": "time_s,a\n0,1\n0.001,oops\n",
    "empty_cell.csv": "time_s,a,b\n0,1,2\n0.001,,2\n",
    "nan.csv": "time_s,a\n0,1\n0.001,NaN\n",
    "duplicate.csv": "time_s,a,a\n0,1,2\n",
    "jump.csv": "time_s,a\n0,1\n0.001,1\n0.002,1\n0.005,1\n0.006,1\n",
    "reversed.csv": "time_s,a\n0,1\n0.002,1\n0.001,1\n0.003,1\n",
    "garbage.bin": new Uint8Array([0xff, 0xfe, 0x00, 0x81, 0x90, 0x00, 0x12]),
    "inf.csv": "time_s,a\n0,1\n0.001,Inf\n",
    "blank_cells.csv": ",\n,\n",
    "truncated.wav": truncatedWav(),
    "mulaw.wav": mulawWav(),
    "good.csv": "time_s,a\n" +
      Array.from({ length: 64 }, (_, i) => `${i / 100},${Math.sin(i)}`).join("\n") +
      "\n",
  };
  const cases: [string, string[], number, RegExp][] = [
    ["empty file", ["empty.csv"], 1, /empty\.csv: the file is empty/],
    ["header only", ["header_only.csv"], 1, /header_only\.csv:1: .*no data rows/],
    ["ragged row", ["ragged.csv"], 1, /ragged\.csv:3: row has 2 fields/],
    ["text in a cell", ["text.csv"], 1, /text\.csv:3:2: "oops" is not a number/],
    ["empty cell", ["empty_cell.csv"], 1, /empty_cell\.csv:3:2: empty cell/],
    ["NaN", ["nan.csv"], 1, /nan\.csv:3:2: .*not a finite number/],
    ["duplicate names", ["duplicate.csv"], 1, /duplicate\.csv:1:3: duplicate column name/],
    ["jumping time", ["jump.csv"], 1, /jump\.csv:5:1: .*gap, jump or jitter/],
    ["reversed time", ["reversed.csv"], 1, /reversed\.csv:4:1: time goes backwards/],
    [
      "binary garbage",
      ["garbage.bin"],
      1,
      /garbage\.bin: neither a WAV or MDF 4 file nor UTF-8 text/,
    ],
    ["Inf", ["inf.csv"], 1, /inf\.csv:3:2: .*not a finite number/],
    ["only blank cells", ["blank_cells.csv"], 1, /blank_cells\.csv: no header row/],
    ["truncated WAV", ["truncated.wav"], 1, /truncated\.wav: truncated: the data chunk declares/],
    [
      "WAV with an unsupported encoding",
      ["mulaw.wav"],
      1,
      /mulaw\.wav: unsupported WAV encoding \(format code 7\)/,
    ],
    ["missing file", ["nope.csv"], 2, /nope\.csv: cannot read: no such file/],
    ["unknown channel", ["good.csv", "--channels", "a,b"], 2, /no channel named "b"/],
    [
      "block longer than the record",
      ["good.csv", "--block", "128"],
      2,
      /good\.csv: --block 128 is longer than the record of 64 samples .*; the largest is 64\n$/,
    ],
    ["negative overlap", ["good.csv", "--overlap=-0.5"], 2, /--overlap: must be at least 0/],
    ["overlap of 1", ["good.csv", "--overlap", "1"], 2, /--overlap: must be less than 1/],
    ["unknown window", ["good.csv", "--window", "kaiser"], 2, /--window: /],
    ["unknown option", ["good.csv", "--widnow", "hann"], 2, /widnow/],
    ["block and resolution", ["good.csv", "--block", "16", "--resolution", "1"], 2, /not both/],
    ["non-numeric block", ["good.csv", "--block", "lots"], 2, /--block: "lots" is not a number/],
    [
      "tau without exponential",
      ["good.csv", "--tau", "2"],
      2,
      /--tau applies to --average exponential/,
    ],
    ["two recordings", ["good.csv", "good.csv"], 2, /one recording/],
  ];

  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-bad-");
    for (const [name, content] of Object.entries(files)) await writeFile(`${dir}/${name}`, content);
  });

  for (const [label, args, code, pattern] of cases) {
    test(`${label}: exit ${code}, one clear line, output untouched`, async () => {
      await writeFile(`${dir}/out.csv`, "previous result\n");
      const before = (await readdir(dir)).sort();
      const r = runQuiver(["spectrum", ...args, "--out", "out.csv"], dir);
      expect(r.code).toBe(code);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(r.stderr).not.toMatch(/\n\s+at /);
      expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("previous result\n");
      expect((await readdir(dir)).sort()).toEqual(before);
    });
  }

  test("--debug adds the stack trace", () => {
    const r = runQuiver(["spectrum", `${dir}/text.csv`, "--debug"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/\n\s+at /);
  });
});
