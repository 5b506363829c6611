import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { encodeWav } from "../../lib/io/wav.ts";

// The reader-level bad inputs, through every command that reads a recording
// (the spectrum command's own, fuller matrix is in spectrum.test.ts).
const FILES: Record<string, string> = {
  "empty.csv": "",
  "header_only.csv": "time_s,f [N],a [m/s^2]\n",
  "ragged.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,1\n",
  "text.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,x,2\n",
  "nan.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,1,NaN\n",
  "duplicate.csv": "time_s,f [N],f [N]\n0,1,2\n",
  "jump.csv": "time_s,f [N],a [m/s^2]\n0,1,2\n0.001,1,2\n0.002,1,2\n0.009,1,2\n0.010,1,2\n",
  "bom_crlf.csv": "\uFEFFtime_s,f [N],a [m/s^2]\r\n" +
    Array.from({ length: 4096 }, (_, i) => `${i / 1000},${Math.sin(i)},${Math.cos(i)}`).join(
      "\r\n",
    ) + "\r\n\r\n",
};
const CASES: [string, number, RegExp][] = [
  ["empty.csv", 1, /empty\.csv: the file is empty/],
  ["header_only.csv", 1, /header_only\.csv:1: .*no data rows/],
  ["ragged.csv", 1, /ragged\.csv:3: row has 2 fields/],
  ["text.csv", 1, /text\.csv:3:2: "x" is not a number/],
  ["nan.csv", 1, /nan\.csv:3:3: .*not a finite number/],
  ["duplicate.csv", 1, /duplicate\.csv:1:3: duplicate column name/],
  ["jump.csv", 1, /jump\.csv:5:1: .*gap, jump or jitter/],
];
const COMMANDS: Record<string, string[]> = {
  frf: ["--input", "f", "--outputs", "a"],
  hammer: ["--force", "f", "--outputs", "a"],
  bands: [],
  // Z weighting: A needs a rate above 24.4 kHz, a fault of the options the header reveals
  // before the data are read.
  level: ["--reference", "1", "--weighting", "Z"],
  orders: ["--tacho", "f", "--ppr", "1", "--channels", "a"],
};

describe("every command refuses bad recordings the same way and writes nothing", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-bad-all-");
    for (const [name, content] of Object.entries(FILES)) await writeFile(`${dir}/${name}`, content);
  });
  for (const [command, args] of Object.entries(COMMANDS)) {
    for (const [file, code, pattern] of CASES) {
      test(`${command}: ${file}`, async () => {
        await writeFile(`${dir}/out.json`, "previous\n");
        const before = (await readdir(dir)).sort();
        const r = runQuiver([command, file, ...args, "--out", "out.json"], dir);
        expect(r.code).toBe(code);
        expect(r.stderr).toMatch(pattern);
        expect(r.stderr.trim().split("\n")).toHaveLength(1);
        expect(await readFile(`${dir}/out.json`, "utf8")).toBe("previous\n");
        expect((await readdir(dir)).sort()).toEqual(before);
      });
    }
  }
  test("a BOM, CRLF and trailing blank lines are read normally by frf", () => {
    const r = runQuiver(
      ["frf", "bom_crlf.csv", "--input", "f", "--outputs", "a", "--block", "512"],
      dir,
    );
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")[0]).toMatch(/^frequency_hz,a_re/);
  });
});

/** A float WAV of two channels with one non-finite sample (past the first read chunk for NaN). */
function floatWavWith(channel: number, sample: number, value: number): Uint8Array {
  const n = 80_000;
  const channels = [0, 1].map((c) => ({
    name: `ch${c + 1}`,
    unit: "FS",
    data: new Float64Array(n).map((_, i) => 0.3 * Math.sin(i / (5 + c))),
  }));
  channels[channel].data[sample] = value;
  return encodeWav({ rate: 8000, startTime: 0, channels }, "float32");
}

describe("a float WAV holding NaN or ±Inf is refused by every command, naming channel and sample", () => {
  const WAV_COMMANDS: Record<string, string[]> = {
    spectrum: [],
    frf: ["--input", "ch1", "--outputs", "ch2"],
    hammer: ["--force", "ch1", "--outputs", "ch2"],
    // WAV channels are in FS, which has no standard level reference (a fault of the
    // options, found from the header before the data are read).
    bands: ["--reference", "1"],
    level: ["--reference", "1", "--weighting", "Z"],
    orders: ["--tacho", "ch1", "--ppr", "1", "--channels", "ch2"],
  };
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-bad-wav-");
    await writeFile(`${dir}/nan.wav`, floatWavWith(1, 70_000, NaN));
    await writeFile(`${dir}/inf.wav`, floatWavWith(0, 3, -Infinity));
  });
  for (const [command, args] of Object.entries(WAV_COMMANDS)) {
    for (
      const [file, pattern] of [
        ["nan.wav", /nan\.wav: channel ch2, sample 70000: NaN is not a finite number/],
        ["inf.wav", /inf\.wav: channel ch1, sample 3: -Infinity is not a finite number/],
      ] as const
    ) {
      test(`${command}: ${file}`, async () => {
        await writeFile(`${dir}/out.json`, "previous\n");
        const r = runQuiver([command, file, ...args, "--out", "out.json"], dir);
        expect(r.code).toBe(1);
        expect(r.stderr).toMatch(pattern);
        expect(await readFile(`${dir}/out.json`, "utf8")).toBe("previous\n");
      });
    }
  }
});
