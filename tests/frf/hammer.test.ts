import { describe, expect, test } from "vitest";
import { hammerFrf } from "../../lib/frf/hammer.ts";
import { findHits } from "../../lib/frf/hits.ts";
import { recordingSource } from "../../lib/io/recording_stream.ts";
import { QuiverError } from "../../lib/errors.ts";
import { driftingHits, MODES_A, MODES_B, RATE, sixHits } from "../helpers/hammer_recording.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { receptance } from "../helpers/modal.ts";
import { gaussianNoise } from "../helpers/random.ts";

describe("hammer test", () => {
  const rec = sixHits();

  test("classifies a six-hit recording with one double and one clipped hit", () => {
    const d = findHits(rec.channels[0].data, { pretriggerSamples: 41 });
    expect(d.hits.map((h) => h.status)).toEqual([
      "accepted",
      "accepted",
      "double",
      "accepted",
      "overload",
      "accepted",
    ]);
    expect(d.hits.map((h) => Math.round(h.sample / RATE))).toEqual([1, 3, 5, 7, 9, 11]);
    expect(d.hits[4].peak).toBeCloseTo(300, 0);
    expect(d.recordSamples).toBe(4096); // 90 % of 2 s less the pre-trigger → 2^12 samples
  });

  test("averages the accepted hits only and puts both modes within one line", async () => {
    const result = await hammerFrf(rec, { force: "hammer", outputs: ["bracket_a", "bracket_b"] });
    expect(result.summary).toBe("6 hits: 4 accepted, 1 double, 1 overload");
    expect(result.table.metadata.averages).toBe(4);
    expect(result.table.metadata.hits_accepted).toEqual([1, 2, 4, 6]);
    const f = result.table.columns[0].values;
    const df = f[1] - f[0];
    for (const name of ["bracket_a", "bracket_b"]) {
      const mag = result.table.columns.find((c) => c.name === `${name}_mag`)!.values;
      for (const mode of MODES_A) {
        let best = 0;
        for (let k = 0; k < f.length; k++) {
          if (Math.abs(f[k] - mode.frequencyHz) < 10 && mag[k] > mag[best]) best = k;
        }
        expect(Math.abs(f[best] - mode.frequencyHz)).toBeLessThanOrEqual(df);
      }
    }
    expect(result.warnings.filter((w) => /left out/.test(w))).toHaveLength(2);
    const status = result.hitLog.columns.find((c) => c.name === "status")!.values;
    expect(Array.from<number | string>(status)).toEqual([
      "accepted",
      "accepted",
      "double",
      "accepted",
      "overload",
      "accepted",
    ]);
  });

  test("a declared range marks a peak at or above it as overload", () => {
    // Sampled peaks sit ~1.2 % below the nominal pulse peaks: 237, 257, 247, 227, 300, 252 N.
    const d = findHits(rec.channels[0].data, { pretriggerSamples: 41, range: 250 });
    expect(d.hits.map((h) => h.status)).toEqual([
      "accepted",
      "overload",
      "double",
      "accepted",
      "overload",
      "overload",
    ]);
  });

  test("a record running past the file end is short", () => {
    const cut = rec.channels[0].data.subarray(0, Math.round(11.5 * RATE));
    const d = findHits(cut, { pretriggerSamples: 41, recordSamples: 4096 });
    expect(d.hits.at(-1)!.status).toBe("short");
  });

  test("a recording read as a stream (spooled to a temporary file) gives the same numbers as in memory", async () => {
    const inMemory = await hammerFrf(rec, { force: "hammer", outputs: ["bracket_a", "bracket_b"] });
    const streamed = await hammerFrf(recordingSource(rec), {
      force: "hammer",
      outputs: ["bracket_a", "bracket_b"],
    });
    expect(streamed.summary).toBe(inMemory.summary);
    expect(streamed.warnings).toEqual(inMemory.warnings);
    streamed.table.columns.forEach((c, i) => {
      expect(Array.from(c.values), c.name).toEqual(Array.from(inMemory.table.columns[i].values));
    });
  });

  test("the exponential window's time constant is recorded for damping correction", async () => {
    const result = await hammerFrf(rec, { force: "hammer", outputs: ["bracket_a"], expEnd: 0.05 });
    // exp(−T/τ) = 0.05 at the record end T = 1 s → τ = 1/ln(20).
    expect(result.table.metadata.exponential_window_tau_s).toBeCloseTo(1 / Math.log(20), 12);
  });

  test("refuses a recording with no accepted hit", async () => {
    await expect(hammerFrf(rec, { force: "hammer", outputs: ["bracket_a"], range: 100 }))
      .rejects.toThrow(QuiverError);
  });

  test("an overload plateau carrying noise from the conditioning chain is found; clean pulses are not", () => {
    // Five half-sine hits of 2 ms at 51.2 kHz (102 samples), peaks 400 N; hit 3 passes an
    // input stage that saturates at 320 N, and the chain after it adds noise of 0.3 N rms
    // to every sample, the plateau included, so no two plateau samples are equal.
    // Common practice: an overloaded hit has a flattened top and is rejected.
    const rate = 51200;
    const n = 6 * rate;
    const noise = gaussianNoise(303, n);
    const force = new Float64Array(n);
    for (let h = 0; h < 5; h++) {
      const start = Math.round((0.5 + h) * rate);
      for (let i = 0; i < 102; i++) {
        const v = 400 * Math.sin(Math.PI * (i + 0.5) / 102);
        force[start + i] = h === 2 ? Math.min(v, 320) : v;
      }
    }
    const measured = force.map((v, i) => v + 0.3 * noise[i]);
    const d = findHits(measured, { pretriggerSamples: 100 });
    expect(d.hits.map((h) => h.status)).toEqual([
      "accepted",
      "accepted",
      "overload",
      "accepted",
      "accepted",
    ]);
    expect(d.hits[2].reason).toMatch(/flat top/);
  });

  test("the H1 FRF equals the analytic receptance of the structure", async () => {
    // Truth: the closed-form receptance of the simulated bracket (Ewins, Modal Testing, 2nd
    // ed., eq. 2.37), evaluated line by line. A factor of 2 anywhere in the force window,
    // averaging or scaling would show here, and so would a sign or phase error (the error is
    // complex), over 10–300 Hz (the 2.5 ms half-sine pulse's first spectral zero is at 600 Hz).
    const result = await hammerFrf(rec, { force: "hammer", outputs: ["bracket_a", "bracket_b"] });
    const col = (name: string) => result.table.columns.find((c) => c.name === name)!.values;
    const f = col("frequency_hz");
    for (const [name, modes] of [["bracket_a", MODES_A], ["bracket_b", MODES_B]] as const) {
      const re = col(`${name}_re`), im = col(`${name}_im`);
      const truth = Array.from(f, (fk) => receptance(modes, fk));
      let peak = 0;
      truth.forEach((h, k) => {
        if (f[k] >= 10 && f[k] <= 300) peak = Math.max(peak, Math.hypot(h.re, h.im));
      });
      for (let k = 0; k < f.length; k++) {
        if (f[k] < 10 || f[k] > 300) continue;
        const h = truth[k];
        // Complex error within 3 % of |H|, with a floor of 0.5 % of the peak for the
        // anti-resonances, where the response noise dominates a tiny |H|.
        const error = Math.hypot(re[k] - h.re, im[k] - h.im);
        expect(error, `${name} at ${f[k]} Hz`).toBeLessThan(
          0.03 * Math.hypot(h.re, h.im) + 0.005 * peak,
        );
      }
    }
  });

  test("a flat force channel is bad data (exit 1 on the command line), not a usage error", () => {
    // A disconnected hammer: every sample 0. Nothing to trigger on; the fault is the data's.
    expect(() => findHits(new Float64Array(4096), { pretriggerSamples: 10 })).toThrow(QuiverError);
    expect(() => findHits(new Float64Array(4096), { pretriggerSamples: 10 })).toThrow(/flat/);
  });
});

describe("usable bandwidth of the hammer", () => {
  test("a half-sine impact: the force autospectrum is 20 dB down where the analytic pulse spectrum says", async () => {
    // Half-sine pulse of duration T: |F(f)| ∝ |cos(πfT)/(1 − (2fT)²)| (Fourier transform of
    // a half sine, textbook result; e.g. Ewins, "Modal Testing", on impactor pulses).
    const rate = 4096, width = 12, T = width / rate;
    const force = new Float64Array(8 * rate);
    for (const at of [0.5, 1.5, 2.5, 3.5, 4.5, 5.5, 6.5]) {
      for (let i = 0; i < width; i++) {
        force[Math.round(at * rate) + i] = 200 * Math.sin((Math.PI * (i + 0.5)) / width);
      }
    }
    const r = await hammerFrf({
      rate,
      startTime: 0,
      channels: [
        { name: "hammer", unit: "N", data: force },
        { name: "tip", unit: "m/s^2", data: force.map((v) => 0.01 * v) },
      ],
    }, { force: "hammer", outputs: ["tip"] });
    const power = (f: number) => {
      const x = f * T;
      const a = Math.abs(1 - 4 * x * x) < 1e-12
        ? Math.PI / 4
        : Math.cos(Math.PI * x) / (1 - 4 * x * x);
      return a * a;
    };
    // The rule, applied to the analytic spectrum here: mean over (0, 2 % of the band], then
    // the first frequency 20 dB below it, by bisection between a line below and one above.
    const df = r.table.metadata.df_hz as number;
    const lines = Math.floor(rate / 2 / df) + 1;
    const low = Math.round(0.02 * lines);
    let mean = 0;
    for (let k = 1; k <= low; k++) mean += power(k * df) / low;
    let a = 0, b = 1.5 / T;
    for (let i = 0; i < 60; i++) {
      const m = (a + b) / 2;
      if (power(m) > mean / 100) a = m;
      else b = m;
    }
    const limit = r.usableBandwidth.limitHz;
    expect(r.usableBandwidth.reached).toBe(true);
    // The first line at or above the analytic crossing (sampling of a 12-sample pulse moves it
    // by well under a line at these frequencies).
    expect(Math.abs(limit - b)).toBeLessThanOrEqual(2 * df);
    expect(r.table.metadata.usable_bandwidth_hz).toBe(limit);
    expect(r.table.columns.some((c) => c.name === "force_autospectrum")).toBe(true);
    // The hit records: one force and one response column per hit, the pulse's peak kept.
    const peak = r.hitRecords.columns.find((c) => c.name === "hit_1_force")!.values;
    // The sampled pulse peaks at 200·sin(π·5.5/12) (samples at i + 0.5).
    expect(peak.reduce((m, v) => Math.max(m, v), 0)).toBeCloseTo(
      200 * Math.sin((Math.PI * 5.5) / 12),
      9,
    );
  });
});

describe("hits on a drifting force channel", () => {
  const { recording, hits: truth } = driftingHits();
  const force = recording.channels[0].data;

  test("the naive rule's trap: a global median and MAD would put the trigger above the light hits", () => {
    // Computed here by sorting, independent of hits.ts: 5 × 1.4826 × MAD about the median.
    const sorted = Float64Array.from(force).sort();
    const median = sorted[sorted.length >> 1];
    const deviations = sorted.map((v) => Math.abs(v - median)).sort();
    const naiveTrigger = 5 * 1.4826 * deviations[deviations.length >> 1];
    expect(naiveTrigger).toBeGreaterThan(20);
  });

  test("all ten hits are found above a baseline that follows the drift, peaks within 0.25 N + 0.1 %", () => {
    const d = findHits(force, { pretriggerSamples: 82 });
    expect(d.hits.map((h) => h.status)).toEqual(new Array(10).fill("accepted"));
    expect(d.belowTrigger.count).toBe(0);
    // 5 % of the largest excursion (≈ 200 N; common practice) wins over 5 σ of 0.05 N noise.
    assertClose(d.trigger, 10, { relative: 0.01, absolute: 0 });
    assertClose(d.noiseSigma, 0.05, { relative: 0.1, absolute: 0 });
    expect(d.triggerRule).toMatch(/5 % of the largest excursion/);
    d.hits.forEach((h, k) => {
      // Analytic: a half-sine peaks at P, T/2 after its start. Tolerance: 5 σ of the noise on
      // the samples the peak is read from, plus 0.1 % for the parabola between samples (the
      // largest sample alone is 0.46 % low on the 200 N hits, which fall half a sample off).
      assertClose(h.peak, truth[k].peak, { relative: 0.001, absolute: 0.25 }, `hit ${k + 1}`);
      expect(Math.abs(h.sample / recording.rate - truth[k].time)).toBeLessThan(0.002);
    });
  });

  test("the report counts the hits and tells of pulses left below a given trigger", async () => {
    const all = await hammerFrf(recording, { force: "hammer", outputs: ["tip"] });
    expect(all.summary).toBe("10 hits: 10 accepted");
    expect(all.table.metadata.trigger_rule).toMatch(/local baseline/);
    const heavy = await hammerFrf(recording, { force: "hammer", outputs: ["tip"], trigger: 50 });
    expect(heavy.summary).toBe("5 hits: 5 accepted; 5 pulses below the trigger");
    const note = heavy.warnings.find((w) => /below|not to the trigger/.test(w));
    expect(note).toMatch(/^5 pulse\(s\) on "hammer" rose above 5 noise sigma .*the largest 20 N\)/);
  });
});
