/**
 * The time constants of ISO 532-1:2017's method for time-varying sounds,
 * each against an analytic expectation: the smoothing of the band levels
 * (three first-order low-passes in cascade), the nonlinear decay of the core
 * loudness (5, 15 and 75 ms) and the temporal weighting of the total (0.47
 * of τ = 3.5 ms, 0.53 of τ = 70 ms). The constants themselves are from
 * memory, as in lib/quality/loudness_envelope.ts and loudness_time_varying.ts;
 * these tests pin the model those files describe, so a constant changed by
 * mistake (a factor 10, two swapped) fails here.
 */
import { describe, expect, test } from "vitest";
import { assertClose } from "../helpers/assert_close.ts";
import { BandEnvelopes } from "../../lib/quality/loudness_envelope.ts";
import { decay, TimeVaryingLoudnessMeter } from "../../lib/quality/loudness_time_varying.ts";
import { pressureOf } from "./signals.ts";

const RATE = 48000;
const STEP = 0.002; // s, the method's step (ISO 532-1:2017, from memory)

/** A tone of r.m.s. `rms` switched on at `on` and off at `off` (s) in a record of `seconds`. */
function burst(hz: number, rms: number, on: number, off: number, seconds: number) {
  const x = new Float64Array(Math.round(seconds * RATE));
  for (let i = Math.round(on * RATE); i < Math.round(off * RATE); i++) {
    x[i] = Math.SQRT2 * rms * Math.sin(2 * Math.PI * hz * (i / RATE - on));
  }
  return x;
}

/** The mean square of one band every 2 ms; `at(t)` is the step that closes at t. */
function bandMeanSquare(x: Float64Array, band: number) {
  const values: number[] = [];
  new BandEnvelopes(RATE).push(x, (ms) => values.push(ms[band]));
  return (t: number) => values[Math.round(t / STEP) - 1];
}

/** Step response of three equal first-order low-passes in cascade (the gamma distribution of order 3). */
const threePole = (t: number, tau: number) =>
  1 - Math.exp(-t / tau) * (1 + t / tau + (t / tau) ** 2 / 2);

describe("the smoothing of the band levels", () => {
  test("4 kHz: the mean square follows a tone's onset and end with τ = 2/3 ms", () => {
    // ISO 532-1:2017 (from memory): τ = 2/3 ms from 1 kHz up, three low-passes in cascade, so
    // the rise is the analytic threePole(t). The band-pass (3rd-order Butterworth prototype,
    // B = 917 Hz) delays it by its group delay 2/(π·B) = 0.69 ms: 4 ms after the onset
    // threePole(3.3 ms) = 0.87 (threePole(4 ms) = 0.94 with no delay); with τ ten times longer
    // (6.7 ms) it would be 0.014. Ten ms after the end the smoothing leaves
    // e^(−15)·(1 + 15 + 112.5) = 4e-5 and the band-pass's own ringing (power decaying at
    // π·B = 2900 /s) less; τ ten times longer would leave 0.8.
    const at = bandMeanSquare(burst(4000, 1, 0.1, 0.3, 0.4), 22);
    const onset = 0.1, end = 0.3, tau = 2 / 3000, delay = 2 / (Math.PI * 917);
    assertClose(at(onset + 0.004), threePole(0.004 - delay, tau), {
      relative: 0,
      absolute: 0.05,
    }, "4 ms after the onset");
    assertClose(at(onset + 0.1), 1, { relative: 0, absolute: 0.01 }, "steady");
    expect(at(end + 0.01)).toBeLessThan(1e-3);
    expect(at(end + 0.002)).toBeGreaterThan(0.1); // and not at once: it is smoothed
  });

  test("200 Hz: settled within 40 ms of the onset, gone within 60 ms of the end", () => {
    // ISO 532-1:2017 (from memory): τ = 2/(3·f_m) = 3.33 ms below 1 kHz; threePole(20 ms) =
    // 0.94. The band path delays the 200 Hz band by about 20 ms (the band-pass's group delay
    // 2/(π·46 Hz) = 14 ms and the four rate-halving low-passes'), so 40 ms after the onset the
    // mean square is within 20 % of steady; with τ ten times longer (33 ms) threePole(20 ms)
    // would be 0.02. After the end, 60 ms: the smoothing's tail is e^(−12)·85 = 5e-4 (bound 1e-2);
    // τ ten times longer would leave 0.9.
    const at = bandMeanSquare(burst(200, 1, 0.1, 0.3, 0.4), 9);
    assertClose(at(0.14), 1, { relative: 0, absolute: 0.2 }, "40 ms after the onset");
    assertClose(at(0.25), 1, { relative: 0, absolute: 0.03 }, "steady");
    expect(at(0.36)).toBeLessThan(1e-2);
  });
});

describe("the nonlinear decay of the core loudness", () => {
  // DIN 45631/A1 as lib/quality/loudness_time_varying.ts describes it (time constants from
  // memory): the output falls towards the store with τ = 5 ms, the store with τ = 15 ms, the
  // store charges towards the output with τ = 75 ms; per 2-ms step the factors are
  // S = e^(−2/5), L = e^(−2/15), C = 1 − e^(−2/75).
  const S = Math.exp(-2 / 5), L = Math.exp(-2 / 15);
  const run = (onSteps: number, offSteps: number) => {
    const out = new Float64Array(1), store = new Float64Array(1);
    for (let i = 0; i < onSteps; i++) decay(new Float64Array([1]), out, store);
    for (let i = 0; i < offSteps; i++) decay(new Float64Array([0]), out, store);
    return { out: out[0], store: store[0] };
  };

  test("after a long sound: store L^k, output L^k + (1 − L)·S·(L^k − S^k)/(L − S)", () => {
    // Analytic: a store full after 2 s (1 − e^(−2000/75) = 1 − 3e-12) decays as L^k; the
    // output's excess over it, d_k = S·(d_(k−1) + L^(k−1)·(1 − L)), sums to the closed form.
    for (const k of [1, 3, 10, 25]) {
      const { out, store } = run(1000, k);
      assertClose(store, L ** k, { relative: 1e-9, absolute: 0 }, `store after ${k} steps`);
      const expected = L ** k + (1 - L) * S * (L ** k - S ** k) / (L - S);
      assertClose(out, expected, { relative: 1e-9, absolute: 0 }, `output after ${k} steps`);
    }
  });

  test("the store charges with τ = 75 ms: after 50 ms of sound it holds 1 − e^(−50/75)", () => {
    // Analytic: the output follows the rise at once, the store climbs as 1 − (1 − C)^k; one
    // step of silence after, the output is L·s + (1 − L·s)·S.
    const s = 1 - Math.exp(-50 / 75);
    assertClose(run(25, 0).store, s, { relative: 1e-12, absolute: 0 }, "store");
    expect(run(25, 0).out).toBe(1);
    assertClose(run(25, 1).out, L * s + (1 - L * s) * S, {
      relative: 1e-12,
      absolute: 0,
    }, "output one step later");
  });
});

describe("the temporal weighting of the total", () => {
  test("a tone's loudness rises as 0.47·(1 − e^(−t/3.5 ms)) + 0.53·(1 − e^(−t/70 ms))", () => {
    // ISO 532-1:2017 (from memory): the total loudness is weighted by 0.47 of a first-order
    // low-pass with τ = 3.5 ms plus 0.53 of one with τ = 70 ms; the core loudness follows the
    // band's rise within a few ms (the smoothing test above) and the onset's broadband click has
    // decayed (τ 5 and 15 ms) by 50 ms, so from then on N(t)/N(steady) is the weighting's step
    // response within 0.015. 1 s after the onset the slow part is within 1e-6 of steady. The
    // weights swapped would give +0.03 at 50 ms; τ_fast ×10, −0.11; τ_slow ×10, −0.23.
    const x = burst(4000, pressureOf(70), 0.1, 1.1, 1.1);
    const m = new TimeVaryingLoudnessMeter(RATE, { history: true });
    m.push(x);
    const h = m.finish().history!;
    const steady = h.at(-1)!;
    const w = (ms: number) => 0.47 * (1 - Math.exp(-ms / 3.5)) + 0.53 * (1 - Math.exp(-ms / 70));
    for (const ms of [50, 100, 200]) {
      const n = h[Math.round((0.1 + ms / 1000) / STEP) - 1];
      assertClose(n / steady, w(ms), { relative: 0, absolute: 0.015 }, `${ms} ms after the onset`);
    }
  }, 120_000);
});
