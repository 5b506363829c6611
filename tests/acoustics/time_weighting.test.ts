import { describe, expect, test } from "vitest";
import { levelHistory } from "../../lib/acoustics/level_analysis.ts";

// IEC 61672-1:2013, 3.9 and 5.8: the time constants, typed here from the standard.
const TAU_S = { fast: 0.125, slow: 1 } as const;

const RATE = 8000;

/** Silence, then a 1 kHz burst of 1 Pa rms from 1 s to 7 s (6 Slow time constants), then silence to 12 s. */
function burst() {
  const data = new Float64Array(12 * RATE).map((_, i) => {
    const t = i / RATE;
    return (t >= 1 && t < 7 ? Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * t) : 0) +
      1e-6 * Math.sin(7 * i);
  });
  return { rate: RATE, startTime: 0, channels: [{ name: "mic", unit: "Pa", data }] };
}

describe("Fast and Slow time weighting", () => {
  for (const weighting of ["fast", "slow"] as const) {
    test(`${weighting}: the burst's level rises and decays with τ = ${TAU_S[weighting]} s`, async () => {
      // IEC 61672-1:2013, 3.9/5.8: exponential time weighting. Analytic response of
      // dy/dt = (x² − y)/τ: y = ms·(1 − e^(−t/τ)) after the onset, and a decay of
      // 10·log10(e)/τ dB per second after the end.
      const tau = TAU_S[weighting];
      const step = 0.005;
      const { table, summary } = await levelHistory(burst(), {
        weighting: "Z",
        timeWeighting: weighting,
        step,
      });
      const time = table.columns[0].values;
      const l = table.columns[1].values;
      const at = (t: number) => l[time.findIndex((v) => Math.abs(v - t) < step / 2)];
      const steady = 10 * Math.log10(1 / (20e-6) ** 2);
      expect(Math.abs(at(1 + tau) - (steady + 10 * Math.log10(1 - Math.exp(-1))))).toBeLessThan(
        0.1,
      );
      const t1 = 7 + tau;
      const t2 = 7 + 3 * tau;
      const slope = (at(t1) - at(t2)) / (t2 - t1);
      expect(Math.abs(slope / ((10 * Math.log10(Math.E)) / tau) - 1)).toBeLessThan(0.01);
      expect(Math.abs(summary[0].lmax - steady)).toBeLessThan(0.1);
    });
  }

  test("Leq, Lmax, Lmin and exceedance levels of a steady tone", async () => {
    const data = new Float64Array(10 * RATE).map((_, i) =>
      0.5 * Math.SQRT2 * Math.sin(2 * Math.PI * 250 * i / RATE)
    );
    const { summary } = await levelHistory({
      rate: RATE,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data }],
    }, {
      weighting: "Z",
    });
    const expected = 10 * Math.log10(0.25 / (20e-6) ** 2); // 0.5 Pa rms, re 20 µPa (ISO 1683)
    for (const key of ["leq", "lmax", "lmin", "l10", "l50", "l90"] as const) {
      expect(Math.abs(summary[0][key] - expected), key).toBeLessThan(0.05);
    }
  });
});

describe("Lmax of tone bursts (IEC 61672-1:2013, Table 4)", () => {
  // A 4 kHz tone burst of duration Tb, in silence, against the steady tone of the same
  // amplitude: the maximum time-weighted level lies δ = 10·lg(1 − e^(−Tb/τ)) dB below the
  // steady level (IEC 61672-1:2013, equation for Table 4). The rounded table values are
  // from memory and agree with the equation to 0.05 dB.
  const cases = [
    { weighting: "fast", tbMs: 200, table: -1.0 },
    { weighting: "fast", tbMs: 50, table: -4.8 },
    { weighting: "fast", tbMs: 10, table: -11.1 },
    { weighting: "fast", tbMs: 2, table: -18.0 },
    { weighting: "slow", tbMs: 500, table: -4.1 },
    { weighting: "slow", tbMs: 200, table: -7.4 },
    { weighting: "slow", tbMs: 50, table: -13.1 },
  ] as const;
  const rate = 48000;
  for (const { weighting, tbMs, table } of cases) {
    test(`${weighting}, ${tbMs} ms burst: Lmax ${table} dB re the steady level`, async () => {
      const tau = TAU_S[weighting];
      const start = Math.round(2 * tau * rate);
      const length = Math.round((tbMs / 1000) * rate); // whole cycles of 4 kHz at 48 kHz
      const data = new Float64Array(start + length + Math.round(2 * tau * rate)).map((
        _,
        i,
      ) => (i >= start && i < start + length
        ? Math.SQRT2 * Math.sin(2 * Math.PI * 4000 * i / rate)
        : 0)
      );
      // The default step of 0.1 s: Lmax must not depend on when readings are taken.
      const { summary } = await levelHistory({
        rate,
        startTime: 0,
        channels: [{ name: "mic", unit: "Pa", data }],
      }, { weighting: "Z", timeWeighting: weighting });
      const steady = 20 * Math.log10(1 / 20e-6); // 1 Pa rms re 20 µPa (ISO 1683)
      const delta = 10 * Math.log10(1 - Math.exp(-(tbMs / 1000) / tau));
      expect(Math.abs(delta - table)).toBeLessThan(0.05);
      expect(Math.abs(summary[0].lmax - steady - delta)).toBeLessThan(0.1);
    });
  }
});

describe("the meter starts from rest (IEC 61672-1:2013, 5.8: exponential averaging)", () => {
  const rate = 48000;
  const pressure = 20e-6 * 10 ** (110 / 20); // rms of 110 dB re 20 µPa (ISO 1683)

  test("a 20 ms, 110 dB burst at the record's very start: Fast Lmax = 110 + 10·lg(1 − e^(−0.02/0.125))", async () => {
    // Analytic response from y = 0: y(Tb) = ms·(1 − e^(−Tb/τ)) → 101.70 dB. A meter that
    // starts from the first τ's mean square instead reads 104.5 dB.
    const burst = Math.round(0.02 * rate); // 960 samples: 20 whole cycles of 1 kHz
    const data = new Float64Array(rate).map((_, i) =>
      i < burst ? pressure * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / rate) : 0
    );
    const { summary } = await levelHistory({
      rate,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data }],
    }, { weighting: "Z", timeWeighting: "fast" });
    const expected = 110 + 10 * Math.log10(1 - Math.exp(-0.02 / TAU_S.fast));
    expect(Math.abs(expected - 101.70)).toBeLessThan(0.005);
    expect(Math.abs(summary[0].lmax - expected)).toBeLessThan(0.1);
  });

  test("Lmin counts once the meter has settled; a record too short to settle says so", async () => {
    // A steady tone from the first sample: read from rest, the level rises for a few τ.
    // Counting that rise would put Lmin tens of dB low; from 5τ on it is the steady level
    // within 10·lg(1 − e^(−5)) = −0.03 dB (common practice: 5 time constants).
    const tone = (seconds: number) =>
      new Float64Array(Math.round(seconds * 8000)).map((_, i) =>
        Math.SQRT2 * Math.sin(2 * Math.PI * 250 * i / 8000)
      );
    const steady = 20 * Math.log10(1 / 20e-6);
    const long = await levelHistory({
      rate: 8000,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data: tone(3) }],
    }, { weighting: "Z", timeWeighting: "fast" });
    expect(Math.abs(long.summary[0].lmin - steady)).toBeLessThan(0.05);
    expect(Math.abs(long.summary[0].l90 - steady)).toBeLessThan(0.05);
    expect(long.table.metadata.statistics_settling_s).toBe(5 * TAU_S.fast);
    expect(long.warnings.join()).not.toMatch(/settling/);
    const short = await levelHistory({
      rate: 8000,
      startTime: 0,
      channels: [{ name: "mic", unit: "Pa", data: tone(0.5) }],
    }, { weighting: "Z", timeWeighting: "fast" });
    expect(short.warnings.join()).toMatch(/shorter than the meter's settling time of 0.625 s/);
  });
});
