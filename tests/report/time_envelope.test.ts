/**
 * The time-history envelope against a brute-force min/max per column on
 * seeded data (exact), chunked any way; clipping marked only where the
 * signal checks warn.
 */
import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import type { RecordingStream } from "../../lib/io/recording_stream.ts";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { historyView, timeEnvelope } from "../../lib/report/time_history.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { recordingCsv } from "../helpers/csv.ts";

/** A stream over arrays in memory that hands out chunks of `chunk` samples. */
function chunked(data: Float64Array[], chunk: number, rate = 100): RecordingStream {
  return {
    rate,
    startTime: 0,
    length: data[0].length,
    channels: data.map((_, i) => ({ name: `c${i}`, unit: "V" })),
    read(selected, onChunk) {
      for (let at = 0; at < data[0].length; at += chunk) {
        onChunk(selected.map((i) => data[i].slice(at, at + chunk)));
      }
      return Promise.resolve();
    },
  };
}

/**
 * Brute force: column c holds the samples i with c·L/C ≤ i < (c+1)·L/C
 * (equal shares of the record, by definition), min and max by a plain scan.
 */
function bruteForce(x: Float64Array, columns: number) {
  const L = x.length, C = Math.min(columns, L);
  const min: number[] = [], max: number[] = [];
  for (let c = 0; c < C; c++) {
    let lo = Infinity, hi = -Infinity;
    for (let i = 0; i < L; i++) {
      if (i * C >= c * L && i * C < (c + 1) * L) {
        lo = Math.min(lo, x[i]);
        hi = Math.max(hi, x[i]);
      }
    }
    min.push(lo);
    max.push(hi);
  }
  return { min, max };
}

describe("time-history envelope", () => {
  test("equals a brute-force min/max per column, whatever the chunking", async () => {
    const data = [gaussianNoise(3, 10_007), gaussianNoise(4, 10_007).map((v) => 5 * v + 2)];
    for (const columns of [1, 7, 333, 2000, 20_000]) {
      const expected = data.map((x) => bruteForce(x, columns));
      for (const chunk of [1, 97, 4096, 10_007]) {
        const e = await timeEnvelope(chunked(data, chunk), columns);
        e.channels.forEach((c, k) => {
          expect(Array.from(c.min), `columns ${columns}, chunk ${chunk}`).toEqual(
            expected[k].min,
          );
          expect(Array.from(c.max)).toEqual(expected[k].max);
        });
        // Never more columns than samples, never more than asked.
        expect(e.channels[0].min.length).toBe(Math.min(columns, 10_007));
      }
    }
    await expect(timeEnvelope(chunked(data, 10), 0)).rejects.toThrow(RangeError);
    await expect(timeEnvelope(chunked(data, 10), 2.5)).rejects.toThrow(RangeError);
  });

  test("through the one reading path (CSV file) with the default 2000 columns", async () => {
    const dir = await mkdtemp("/tmp/quiver-envelope-");
    const x = gaussianNoise(9, 30_001);
    await writeFile(
      `${dir}/r.csv`,
      recordingCsv({ rate: 1000, startTime: 0, channels: [{ name: "a", unit: "V", data: x }] }),
    );
    const stream = await openRecordingStream(`${dir}/r.csv`, { rate: 1000 });
    const e = await timeEnvelope(stream);
    // The CSV holds shortest round-trip numbers: the values read are the values written.
    const expected = bruteForce(x, 2000);
    expect(Array.from(e.channels[0].min)).toEqual(expected.min);
    expect(Array.from(e.channels[0].max)).toEqual(expected.max);
    const { spec } = historyView("r", e, []);
    expect(spec.t.length).toBe(2000);
    expect(spec.channels[0].min.length).toBe(2000);
  });

  test("clipping marked where the signal checks warn, not at a clean signal's peaks", async () => {
    const n = 4000;
    // A 5 Hz sine at 100 Hz sampling cut at ±0.8 (common practice: a flat top is clipping).
    const sine = new Float64Array(n).map((_, i) => Math.sin(2 * Math.PI * 5 * i / 100));
    const cut = sine.map((v) => Math.max(-0.8, Math.min(0.8, v)));
    const e = await timeEnvelope(chunked([sine, cut], 512), 400);
    const [clean, clipped] = e.channels;
    // A naive rule (mark columns reaching the channel's extremes) would mark the clean sine's
    // peaks; the checks do not warn of clipping there, so nothing is marked.
    expect(clean.warnings.some((w) => w.includes("clipped"))).toBe(false);
    expect(clean.clipped).toEqual([]);
    expect(clipped.warnings.some((w) => w.includes("clipped"))).toBe(true);
    // The marked columns are exactly those holding a sample at ±0.8 (brute force).
    const expected: number[] = [];
    for (let c = 0; c < 400; c++) {
      let at = false;
      for (let i = c * 10; i < (c + 1) * 10; i++) if (Math.abs(cut[i]) === 0.8) at = true;
      if (at) expected.push(c);
    }
    expect(expected.length).toBeGreaterThan(0);
    expect(clipped.clipped).toEqual(expected);
  });
});
