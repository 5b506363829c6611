import { describe, expect, test } from "vitest";
import { bandLevels } from "../../lib/acoustics/band_analysis.ts";
import {
  band,
  bandHolding,
  bandsHolding,
  bandsInRange,
  midbandHz,
} from "../../lib/acoustics/bands.ts";
import { FilterBankMeter, filterBankPowers } from "../../lib/acoustics/filter_bank.ts";
import { iecA } from "../helpers/iec_weighting.ts";
import type { Recording } from "../../lib/io/recording.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { gaussianNoise } from "../helpers/random.ts";

const G = 10 ** 0.3; // IEC 61260-1:2014 eq. 1, base-10 octave ratio

describe("IEC 61260-1 bands", () => {
  test("exact mid-band frequencies for odd and even b (formulas 2 and 3)", () => {
    assertClose(midbandHz(-10, 3), 100, { relative: 1e-14, absolute: 0 });
    assertClose(midbandHz(1, 3), 1000 * G ** (1 / 3), { relative: 1e-14, absolute: 0 });
    assertClose(midbandHz(-3, 1), 1000 * G ** -3, { relative: 1e-14, absolute: 0 }); // ≈ 125.89 Hz
    assertClose(midbandHz(0, 6), 1000 * G ** (1 / 12), { relative: 1e-14, absolute: 0 });
    assertClose(midbandHz(-1, 24), 1000 * G ** (-1 / 48), { relative: 1e-14, absolute: 0 });
  });

  test("band edges are fm·G^(∓1/2b) (formulas 4 and 5)", () => {
    const b = band(0, 3);
    assertClose(b.lowerHz, 1000 * G ** (-1 / 6), { relative: 1e-14, absolute: 0 });
    assertClose(b.upperHz, 1000 * G ** (1 / 6), { relative: 1e-14, absolute: 0 });
    assertClose(b.lowerHz, 891.2509381, { relative: 1e-9, absolute: 0 });
    assertClose(b.upperHz, 1122.018454, { relative: 1e-9, absolute: 0 });
  });

  test("nominal labels of the one-third-octave bands from 25 Hz to 20 kHz", () => {
    // IEC 61260-1:2014 Annex E (preferred numbers, R10 series).
    expect(bandsInRange(3, 24, 21000).map((b) => b.nominalHz)).toEqual([
      25,
      31.5,
      40,
      50,
      63,
      80,
      100,
      125,
      160,
      200,
      250,
      315,
      400,
      500,
      630,
      800,
      1000,
      1250,
      1600,
      2000,
      2500,
      3150,
      4000,
      5000,
      6300,
      8000,
      10000,
      12500,
      16000,
      20000,
    ]);
    expect(bandsInRange(1, 30, 17000).map((b) => b.nominalHz)).toEqual([
      31.5,
      63,
      125,
      250,
      500,
      1000,
      2000,
      4000,
      8000,
      16000,
    ]);
  });
});

const RATE = 16384;
const SECONDS = 16;
const rms2 = (rms: number) => rms * rms;

function tones(list: { f: number; rms: number }[], noise = 0): Recording {
  const n = RATE * SECONDS;
  const w = gaussianNoise(99, n);
  const data = new Float64Array(n).map((_, i) =>
    list.reduce(
      (s, t) => s + t.rms * Math.SQRT2 * Math.sin(2 * Math.PI * t.f * (i / RATE) + t.f),
      0,
    ) + noise * w[i]
  );
  return { rate: RATE, startTime: 0, channels: [{ name: "cabin_mic", unit: "Pa", data }] };
}

const level = (ms: number) => 10 * Math.log10(ms / (20e-6) ** 2);

describe("band levels", () => {
  for (const method of ["fft", "filter"] as const) {
    test(`${method}: a tone at a band centre reads its level plus the weighting within 0.1 dB`, async () => {
      const f = band(-7, 3).centerHz; // ≈ 199.5 Hz
      const result = await bandLevels(tones([{ f, rms: 0.2 }]), { method, weighting: "A" });
      const row = result.table.columns[0].values.findIndex((c) => Math.abs(c - f) < 1e-6);
      const read = result.table.columns[4].values[row];
      // IEC 61672-1 A-weighting at the tone's frequency, added to 20·log10(0.2/20 µPa).
      expect(Math.abs(read - (level(rms2(0.2)) + iecA(f)))).toBeLessThan(0.1);
    });
  }

  test("fft: a tone exactly on a band edge splits half and half (−3.01 dB each)", async () => {
    // By the documented rule: a line's power is shared by the part of its bin in each band.
    const edge = band(0, 3).upperHz;
    const rec = tones([{ f: edge, rms: 0.5 }]);
    const result = await bandLevels(rec, { resolution: RATE / 65536 * 4 });
    const cols = result.table.columns;
    const lower = cols[4].values[cols[1].values.indexOf(1000)];
    const upper = cols[4].values[cols[1].values.indexOf(1250)];
    expect(Math.abs(lower - (level(0.25) - 3.0103))).toBeLessThan(0.1);
    expect(Math.abs(upper - (level(0.25) - 3.0103))).toBeLessThan(0.1);
  });

  test("fft: the energy sum of the bands equals the overall level of the signal within 0.1 dB", async () => {
    const list = [40, 180, 700, 1500, 3200].map((f, i) => ({ f, rms: 0.05 * (i + 1) }));
    const result = await bandLevels(tones(list), {});
    const expected = level(list.reduce((s, t) => s + rms2(t.rms), 0)); // Parseval: tones are orthogonal
    expect(Math.abs(result.overall[0].levelDb - expected)).toBeLessThan(0.1);
  });

  test("fft and filter bank agree on broadband noise within 0.5 dB per band", async () => {
    const rec = tones([], 0.3);
    const fft = await bandLevels(rec, { minHz: 50, maxHz: 5000 });
    const filter = await bandLevels(rec, { minHz: 50, maxHz: 5000, method: "filter" });
    const a = fft.table.columns[4].values;
    const b = filter.table.columns[4].values;
    for (let i = 0; i < a.length; i++) expect(Math.abs(a[i] - b[i]), `band ${i}`).toBeLessThan(0.5);
  });

  test("warns about bands holding too few lines", async () => {
    const result = await bandLevels(tones([{ f: 1000, rms: 1 }]), { block: 1024 });
    expect(result.warnings.join()).toMatch(/fewer than 5 lines/);
  });
});

describe("the filter bank read in chunks", () => {
  test("gives exactly the numbers of one pass over the whole record", () => {
    // Reference: the same bank over the whole record at once (every filter keeps its
    // state and halving the rate keeps the even samples, so the arithmetic is the same).
    const rate = 8192;
    const x = gaussianNoise(31, 5 * rate + 777);
    const bands = bandsInRange(3, 25, 2000);
    const whole = filterBankPowers(x, rate, bands);
    const meter = new FilterBankMeter(rate, x.length, bands);
    for (let at = 0; at < x.length; at += 3001) meter.push(x.slice(at, at + 3001));
    const chunked = meter.finish();
    expect(Array.from(chunked.power)).toEqual(Array.from(whole.power));
    expect(Array.from(chunked.bandRate)).toEqual(Array.from(whole.bandRate));
    expect(chunked.shortRecord).toEqual(whole.shortRecord);
  });
});

describe("band ranges named by frequency", () => {
  test("20 Hz and 20 kHz name the bands of those labels, whose exact mid-bands lie just below", () => {
    // IEC 61260-1:2014 formula 2: band x = −17 has fₘ = 1000·G^(−17/3) = 19.953 Hz, nominal 20
    // Hz; x = 13 has 19 953 Hz, nominal 20 kHz. A range read as "fₘ ≥ 20 Hz" loses the former.
    expect(bandHolding(20, 3).index).toBe(-17);
    assertClose(bandHolding(20, 3).centerHz, 1000 * G ** (-17 / 3), {
      relative: 1e-14,
      absolute: 0,
    });
    expect(bandHolding(20000, 3).index).toBe(13);
    const thirds = bandsHolding(3, 20, 20000);
    expect(thirds.length).toBe(31);
    expect([thirds[0].nominalHz, thirds[30].nominalHz]).toEqual([20, 20000]);
    // A frequency on an edge is the geometric mean of two mid-bands: just above it, the upper band.
    expect(bandHolding(band(0, 3).upperHz * 1.0001, 3).index).toBe(1);
    expect(bandHolding(band(0, 3).upperHz * 0.9999, 3).index).toBe(0);
    // Even b (formula 3): fₘ = 1000·G^((2x + 1)/(2b)), so 1000 Hz lies between x = −1 and 0.
    expect(bandHolding(1000 * G ** (1 / 12), 6).index).toBe(0);
    expect(bandHolding(1000 * G ** (-1 / 12), 6).index).toBe(-1);
  });

  test("the default range at 48 kHz holds the 20 Hz and the 20 kHz bands; their tones count in the overall", async () => {
    // The 20 kHz band's upper edge, 19 953·G^(1/6) = 22 387 Hz, lies below Nyquist (24 kHz).
    const rate = 48000, n = 6 * rate;
    const list = [{ f: 20, rms: 0.5 }, { f: 1000, rms: 0.1 }, { f: 20000, rms: 0.5 }];
    const data = new Float64Array(n).map((_, i) =>
      list.reduce((s, t) => s + t.rms * Math.SQRT2 * Math.sin(2 * Math.PI * t.f * (i / rate)), 0)
    );
    const result = await bandLevels({
      rate,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data }],
    });
    const nominal = result.table.columns[1].values;
    expect(nominal[0]).toBe(20);
    expect(nominal[nominal.length - 1]).toBe(20000);
    expect(result.table.metadata.band_range_nominal_hz).toEqual([20, 20000]);
    // Parseval: the tones are orthogonal, so the overall is the sum of their mean squares.
    const expected = level(list.reduce((s, t) => s + rms2(t.rms), 0));
    expect(Math.abs(result.overall[0].levelDb - expected)).toBeLessThan(0.1);
    expect(result.warnings.join()).not.toMatch(/left out/);
  });

  test("bands reaching beyond Nyquist are cut, and a range the caller gave says so", async () => {
    const rec = tones([{ f: 1000, rms: 1 }]); // 16 384 Hz: Nyquist 8192 Hz
    const given = await bandLevels(rec, { maxHz: 10000 });
    const nominal = given.table.columns[1].values;
    // 8 kHz band: upper edge 7943·G^(1/6) = 8913 Hz > 8192 Hz, cut; 6.3 kHz (7079 Hz) kept.
    expect(nominal[nominal.length - 1]).toBe(6300);
    expect(given.warnings.join()).toMatch(/above 6300 Hz are left out.*half the sample rate/);
  });

  test("the default fft block follows the lowest band, as --help says, not the record's length", async () => {
    // 100 Hz third octave: width 100·(G^(1/6) − G^(−1/6)) = 23.16 Hz (IEC 61260-1 formulas 4, 5);
    // 5 lines need df ≤ 4.63 Hz: 4096/4.63 = 884 → 1024 samples, while a quarter of the
    // 8192-sample record is 2048.
    const width = 100 * (G ** (1 / 6) - G ** (-1 / 6));
    const expected = 2 ** Math.ceil(Math.log2((5 * 4096) / width));
    expect(expected).toBe(1024);
    const data = new Float64Array(8192).map((_, i) => Math.sin(2 * Math.PI * 250 * i / 4096));
    const result = await bandLevels({
      rate: 4096,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data }],
    }, { minHz: 100, maxHz: 1000 });
    expect(result.table.metadata.block).toBe(expected);
  });
});
