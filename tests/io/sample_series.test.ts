import { describe, expect, test } from "vitest";
import {
  kthSmallest,
  kthSmallestOfMany,
  medianOfSeries,
  memorySeries,
  spoolChannels,
} from "../../lib/io/sample_series.ts";
import { recordingSource } from "../../lib/io/recording_stream.ts";
import { gaussianNoise, uniformGenerator } from "../helpers/random.ts";

// Reference: the k-th order statistic is by definition the value at index k of the sorted
// record; Float64Array.prototype.sort sorts numerically (ECMA-262, TypedArray sort).
const sortedAt = (data: Float64Array, k: number) => data.slice().sort()[k];

describe("exact order statistics of a series", () => {
  const cases: [string, Float64Array][] = [
    ["gaussian noise", gaussianNoise(11, 300_001)],
    ["a TTL tacho (two values)", new Float64Array(200_000).map((_, i) => (i % 37 < 18 ? 0 : 5))],
    [
      "heavy ties and a tiny spread",
      (() => {
        const u = uniformGenerator(5);
        return new Float64Array(250_000).map(() => 1 + Math.floor(u() * 3) * 1e-15);
      })(),
    ],
    [
      "huge range",
      new Float64Array(100_003).map((_, i) => (i % 2 ? 1 : -1) * 10 ** ((i % 600) - 300)),
    ],
  ];
  for (const [name, data] of cases) {
    test(`${name}: the median and the 2nd and 98th percentile ranks equal a full sort`, () => {
      const series = memorySeries(data);
      const n = data.length;
      for (const k of [0, Math.round(0.02 * (n - 1)), n >> 1, Math.round(0.98 * (n - 1)), n - 1]) {
        expect(kthSmallest(series, k), `k = ${k}`).toBe(sortedAt(data, k));
      }
    });
    test(`${name}: several ranks in one call (shared passes) equal a full sort`, () => {
      const n = data.length;
      const ks = [n - 1, Math.round(0.98 * (n - 1)), 0, n >> 1, (n >> 1) - 1, 1];
      const sorted = data.slice().sort();
      expect(kthSmallestOfMany(memorySeries(data), ks)).toEqual(ks.map((k) => sorted[k]));
    });
  }

  test("the median of an even-length series is the mean of the two middle sorted values", () => {
    const data = gaussianNoise(12, 200_000);
    const sorted = data.slice().sort();
    expect(medianOfSeries(memorySeries(data))).toBe((sorted[99_999] + sorted[100_000]) / 2);
  });

  test("with a map: the median absolute deviation equals the sorted one", () => {
    const data = gaussianNoise(2, 150_000);
    const centre = 0.0123;
    const k = data.length >> 1;
    const deviations = data.map((v) => Math.abs(v - centre));
    expect(kthSmallest(memorySeries(data), k, (v) => Math.abs(v - centre))).toBe(
      sortedAt(deviations, k),
    );
  });

  test("a spooled channel reads back every sample and gives the same statistics", async () => {
    const data = gaussianNoise(8, 200_000);
    const spool = await spoolChannels(
      recordingSource({ rate: 100, startTime: 0, channels: [{ name: "x", unit: "V", data }] }),
      [0],
    );
    try {
      const [series] = spool.series;
      expect(series.length).toBe(data.length);
      expect(Array.from(series.read(123_456, 123_466))).toEqual(
        Array.from(data.subarray(123_456, 123_466)),
      );
      const record = new Float64Array(5);
      series.readInto(record, 199_995);
      expect(Array.from(record)).toEqual(Array.from(data.subarray(199_995)));
      expect(() => series.readInto(record, 199_996)).toThrow(RangeError);
      expect(kthSmallest(series, 100_000)).toBe(sortedAt(data, 100_000));
      // The spool learns the range while writing; order statistics then skip their range pass.
      let lo = Infinity, hi = -Infinity;
      for (const v of data) [lo, hi] = [Math.min(lo, v), Math.max(hi, v)];
      expect(series.extent).toEqual([lo, hi]);
      const ks = [0, 1, 4_000, 199_998, 199_999];
      const sorted = data.slice().sort();
      expect(kthSmallestOfMany(series, ks)).toEqual(ks.map((k) => sorted[k]));
      let sum = 0;
      series.scan((chunk) => {
        for (const v of chunk) sum += v;
      });
      let expected = 0;
      for (const v of data) expected += v;
      expect(sum).toBe(expected);
    } finally {
      spool.close();
    }
  });

  test("a spooled TTL tacho and a constant channel: percentiles from the spool's range", async () => {
    const ttl = new Float64Array(150_000).map((_, i) => (i % 37 < 18 ? 0 : 5));
    const flat = new Float64Array(150_000).fill(-2.5);
    const spool = await spoolChannels(
      recordingSource({
        rate: 100,
        startTime: 0,
        channels: [{ name: "t", unit: "V", data: ttl }, { name: "f", unit: "V", data: flat }],
      }),
      [0, 1],
    );
    try {
      const ks = [2_999, 75_000, 146_999];
      expect(spool.series[0].extent).toEqual([0, 5]);
      expect(kthSmallestOfMany(spool.series[0], ks)).toEqual(ks.map((k) => sortedAt(ttl, k)));
      expect(spool.series[1].extent).toEqual([-2.5, -2.5]);
      expect(kthSmallestOfMany(spool.series[1], ks)).toEqual([-2.5, -2.5, -2.5]);
    } finally {
      spool.close();
    }
  });

  test("refuses an index outside the record and values that are not finite", () => {
    expect(() => kthSmallest(memorySeries(new Float64Array(3)), 3)).toThrow(RangeError);
    expect(() => kthSmallest(memorySeries(new Float64Array([1, NaN, 2])), 1)).toThrow(/finite/);
  });
});
