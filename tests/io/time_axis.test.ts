import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { runQuiver } from "../helpers/cli.ts";

/** A CSV whose time column is printed with `decimals` decimals (as many loggers write it). */
function csv(rate: number, rows: number, decimals: number): string {
  const lines = ["time_s,acc [m/s^2]"];
  for (let i = 0; i < rows; i++) {
    lines.push(`${(i / rate).toFixed(decimals)},${Math.sin(2 * Math.PI * 125 * i / rate)}`);
  }
  return lines.join("\n") + "\n";
}

describe("the sample rate of a rounded time column", () => {
  test("4096 Hz with 6-decimal time stamps reads 4096 Hz exactly, in both readers", async () => {
    // Without the rule, (rows − 1)/span = 32767/7.999756 = 4095.99998… Hz (arithmetic).
    const text = csv(4096, 32768, 6);
    expect(parseCsvRecording(text).rate).toBe(4096);
    const dir = await mkdtemp("/tmp/quiver-rate-");
    await writeFile(`${dir}/r.csv`, text);
    const stream = await openRecordingStream(`${dir}/r.csv`, {});
    expect(stream.rate).toBe(4096);
  });

  test("a non-integer rate written with enough decimals stays what it is", () => {
    // 1000.5 Hz with 9 decimals: the whole-Hz candidates 1000 and 1001 imply spans that
    // differ from the column's by far more than 1e-9 s; 1000.5 matches (arithmetic).
    expect(parseCsvRecording(csv(1000.5, 4000, 9)).rate).toBe(1000.5);
  });

  test("spectrum of that file puts a 125 Hz tone on the line 125 Hz and says df 1 Hz", async () => {
    const dir = await mkdtemp("/tmp/quiver-rate-cli-");
    await writeFile(`${dir}/r.csv`, csv(4096, 32768, 6));
    const r = runQuiver(["spectrum", "r.csv", "--block", "4096", "--kind", "rms"], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/df 1 Hz/);
    const row = r.stdout.split("\n").find((l) => l.startsWith("125,"));
    expect(row).toBeDefined();
    // A 1-amplitude sinusoid on a line, Hann window: RMS 1/√2 (analytic).
    expect(Math.abs(Number(row!.split(",")[1]) - Math.SQRT1_2)).toBeLessThan(1e-6);
  });
});
