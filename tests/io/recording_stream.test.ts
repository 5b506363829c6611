import { readFileSync } from "node:fs";
import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { bandLevels } from "../../lib/acoustics/band_analysis.ts";
import { levelHistory } from "../../lib/acoustics/level_analysis.ts";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { readRecordingFile } from "../../lib/io/read_recording.ts";
import { CHUNK_ROWS, openRecordingStream } from "../../lib/io/recording_stream.ts";
import { encodeWav } from "../../lib/io/wav.ts";
import { fixturePath } from "../helpers/fixtures.ts";
import { gaussianNoise } from "../helpers/random.ts";

describe("chunked reading", () => {
  test("the chunked reader gives exactly the numbers of the in-memory reader", async () => {
    const path = fixturePath("recordings/bench_shaker_2ch.csv");
    const whole = parseCsvRecording(readFileSync(path, "utf8"));
    const stream = await openRecordingStream(path);
    expect(stream.rate).toBe(whole.rate);
    const parts: Float64Array[][] = [[], []].map(() => []);
    await stream.read([0, 1], (chunk) => chunk.forEach((c, i) => parts[i].push(c.slice())));
    for (const i of [0, 1]) {
      const joined = new Float64Array(parts[i].flatMap((p) => Array.from(p)));
      expect(Array.from(joined)).toEqual(Array.from(whole.channels[i].data));
    }
  });

  test("a streamed spectrum equals the whole-file spectrum exactly (CSV over several chunks, and WAV)", async () => {
    const dir = await mkdtemp("/tmp/quiver-stream-");
    const n = 3 * CHUNK_ROWS + 1234;
    const a = gaussianNoise(1, n), b = gaussianNoise(2, n);
    const rows = Array.from({ length: n }, (_, i) => `${i / 2048},${a[i]},${b[i]}`);
    await writeFile(`${dir}/long.csv`, `time_s,a [V],b [V]\n${rows.join("\n")}\n`);
    await writeFile(
      `${dir}/long.wav`,
      encodeWav({
        rate: 2048,
        startTime: 0,
        channels: [{ name: "ch1", unit: "FS", data: a.map((v) => v / 8) }],
      }, "pcm24"),
    );
    await writeFile(
      `${dir}/setup.json`,
      JSON.stringify({ channels: { a: { unit: "m/s^2", sensitivity_mv_per_unit: 10.2 } } }),
    );
    for (
      const [file, options] of [["long.csv", { setup: `${dir}/setup.json` }], [
        "long.wav",
        {},
      ]] as const
    ) {
      const spectrumOptions = { block: 4096, overlap: 0.6, kind: "rms" as const };
      const streamed = await averagedSpectrum(
        await openRecordingStream(`${dir}/${file}`, options),
        spectrumOptions,
      );
      const whole = await averagedSpectrum(
        await readRecordingFile(`${dir}/${file}`, options),
        spectrumOptions,
      );
      expect(streamed.metadata).toEqual(whole.metadata);
      streamed.columns.forEach((c, i) =>
        expect(Array.from(c.values)).toEqual(Array.from(whole.columns[i].values))
      );
    }
  });

  test("streamed FRF and band levels equal their whole-file results exactly", async () => {
    const dir = await mkdtemp("/tmp/quiver-stream-");
    const n = 2 * CHUNK_ROWS + 777;
    const f = gaussianNoise(3, n), noise = gaussianNoise(4, n);
    const y = f.map((v, i) => 0.7 * v + 0.2 * (f[i - 1] ?? 0) + 0.1 * noise[i]);
    const rows = Array.from({ length: n }, (_, i) => `${i / 4096},${f[i]},${y[i]}`);
    await writeFile(`${dir}/shaker.csv`, `time_s,force [N],acc [m/s^2]\n${rows.join("\n")}\n`);
    const path = `${dir}/shaker.csv`;
    const whole = await readRecordingFile(path);
    const frfOptions = { input: "force", outputs: ["acc"], block: 1024 };
    const a = await frequencyResponse(await openRecordingStream(path), frfOptions);
    const b = await frequencyResponse(whole, frfOptions);
    expect(a.table.metadata).toEqual(b.table.metadata);
    a.table.columns.forEach((c, i) =>
      expect(Array.from(c.values)).toEqual(Array.from(b.table.columns[i].values))
    );
    const bandOptions = { channels: ["acc"], weighting: "A" as const };
    const c = await bandLevels(await openRecordingStream(path), bandOptions);
    const d = await bandLevels(whole, bandOptions);
    expect(c.table.metadata).toEqual(d.table.metadata);
    c.table.columns.forEach((col, i) =>
      expect(Array.from(col.values)).toEqual(Array.from(d.table.columns[i].values))
    );
    for (const timeWeighting of ["fast", "slow", "none"] as const) {
      const levelOptions = {
        channels: ["acc"],
        weighting: "Z" as const,
        timeWeighting,
        reference: 1,
      };
      const e = await levelHistory(await openRecordingStream(path), levelOptions);
      const g = await levelHistory(whole, levelOptions);
      expect(e.table.metadata).toEqual(g.table.metadata);
      e.table.columns.forEach((col, i) =>
        expect(Array.from(col.values)).toEqual(Array.from(g.table.columns[i].values))
      );
    }
  });

  test("unusual files are read by the same chunked reader, and faults named where found", async () => {
    const dir = await mkdtemp("/tmp/quiver-stream-");
    await writeFile(`${dir}/semi.csv`, "time;a\n0;1,5\n0,5;2\n1;3\n");
    await writeFile(`${dir}/quoted.csv`, 'time_s,a\n0,"1"\n0.5,2\n1,3\n');
    await writeFile(`${dir}/bad.csv`, "time_s,a\n0,1\n0.5,x\n1,3\n");
    const read = async (file: string) => {
      const stream = await openRecordingStream(`${dir}/${file}`);
      const out: number[] = [];
      await stream.read([0], (chunk) => out.push(...chunk[0]));
      return { rate: stream.rate, values: out };
    };
    // Decimal commas with ";": the values as written (arithmetic).
    expect(await read("semi.csv")).toEqual({ rate: 2, values: [1.5, 2, 3] });
    expect(await read("quoted.csv")).toEqual({ rate: 2, values: [1, 2, 3] });
    await expect(read("bad.csv")).rejects.toThrow(/bad\.csv:3:2: "x" is not a number/);
    // A bad cell in a row with quoted cells is named at its own column.
    await writeFile(`${dir}/bad_quoted.csv`, 'time_s,a,b\n0,"1","2"\n0.5,"3","x"\n1,5,6\n');
    await expect(read("bad_quoted.csv")).rejects.toThrow(
      /bad_quoted\.csv:3:3: "x" is not a number/,
    );
  });
});
