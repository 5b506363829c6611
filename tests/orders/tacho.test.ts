import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { motionFromPulses, motionFromRpm } from "../../lib/orders/shaft_motion.ts";
import { tachoPulses } from "../../lib/orders/tacho.ts";
import {
  inductiveTacho,
  linearProfile,
  orderResponse,
  type Profile,
  quadraticProfile,
  ttlTacho,
} from "../helpers/run_up.ts";
import { motionOfSeries } from "../../lib/orders/speed.ts";
import { memorySeries } from "../../lib/io/sample_series.ts";
import { gaussianNoise, uniformGenerator } from "../helpers/random.ts";

const RATE = 51200; // a common acquisition rate; a 60-pulse wheel at 4800 rpm pulses at 4.8 kHz

describe("tacho pulses read in chunks", () => {
  test("an edge that falls between two chunks is timed as in one piece, at its true crossing", () => {
    // Truth: each edge is a straight ramp from 0 to 5 V over 4 samples, so the 2.5 V crossing
    // lies exactly half-way up the ramp (linear interpolation is exact on a line).
    const period = 40, edgeStart = 10;
    const signal = new Float64Array(41 * period).map((_, i) => {
      const phase = i % period;
      if (phase < edgeStart) return 0;
      if (phase < edgeStart + 4) return (5 * (phase - edgeStart)) / 4;
      return phase < 30 ? 5 : 0;
    });
    const chunked = (size: number) => ({
      length: signal.length,
      read: (from: number, to: number) => signal.slice(from, to),
      readInto: (target: Float64Array, from: number) =>
        target.set(signal.subarray(from, from + target.length)),
      scan(visit: (chunk: Float64Array, offset: number) => void) {
        for (let at = 0; at < signal.length; at += size) {
          visit(signal.slice(at, Math.min(signal.length, at + size)), at);
        }
      },
    });
    const whole = tachoPulses(signal, 1000, { ppr: 1, level: 2.5, hysteresis: 1 }).times;
    expect(whole.length).toBe(41);
    whole.forEach((t, k) => expect(t).toBeCloseTo((k * period + edgeStart + 2) / 1000, 12));
    // Chunks of 12 samples: edges start at 10, 50, 90, …, so some crossings straddle a chunk.
    const inPieces = tachoPulses(chunked(12), 1000, { ppr: 1, level: 2.5, hysteresis: 1 }).times;
    expect(Array.from(inPieces)).toEqual(Array.from(whole));
  });
});

describe("rpm from a tacho", () => {
  for (const ppr of [1, 2, 60]) {
    test(`${ppr} pulse(s) per revolution with one missing pulse: rpm within 0.5 %`, () => {
      // Truth: the analytic profile; the rpm at each reading is compared with it.
      const profile = quadraticProfile(900, 4800, 20);
      const signal = ttlTacho(profile, RATE, 20, ppr, 10 * ppr + 1);
      const pulses = tachoPulses(signal, RATE, { ppr });
      expect(pulses.inserted).toBe(1);
      const motion = motionFromPulses(pulses.times, ppr);
      let worst = 0;
      motion.times.forEach((t, i) => {
        if (t < 0.5 || t > 19.5) return;
        worst = Math.max(worst, Math.abs(motion.rpm[i] / profile.rpm(t) - 1));
      });
      expect(worst).toBeLessThan(0.005);
      // The angle follows the shaft too: within 1 % of a revolution at mid-record.
      const offset = motion.angleAt(pulses.times[0]) - profile.angle(pulses.times[0]);
      expect(Math.abs(motion.angleAt(10) - offset - profile.angle(10))).toBeLessThan(0.01);
    });
  }

  for (const [label, r0, r1] of [["run-up", 900, 4800], ["run-down", 4800, 900]] as const) {
    test(`${label}, 2 pulses per revolution at 8192 Hz: rpm at the first and last pulses`, () => {
      // Truth: the analytic linear profile. A TTL edge's time is known to ±½ sample, so a fit
      // over half a window at the record's ends read the end speeds 0.3 % off.
      const profile = linearProfile(r0, r1, 20);
      const rate = 8192;
      const pulses = tachoPulses(ttlTacho(profile, rate, 20, 2), rate, { ppr: 2 });
      const motion = motionFromPulses(pulses.times, 2);
      const n = motion.times.length;
      // The high-speed end within 0.1 %; the low-speed end, where the speed changes most
      // over the fit's window of pulses, within 0.3 %.
      const [high, low] = r1 > r0 ? [n - 1, 0] : [0, n - 1];
      const error = (j: number) => Math.abs(motion.rpm[j] / profile.rpm(motion.times[j]) - 1);
      expect(error(high), "high-speed end").toBeLessThan(0.001);
      expect(error(low), "low-speed end").toBeLessThan(0.003);
    });
  }

  test("a long encoder record (60 pulses/rev, 50 s at 51.2 kHz, ~225 000 pulses) is read", () => {
    // Crashed with "Maximum call stack size exceeded" from Math.min(...intervals).
    // Pulse count from the analytic angle: (3000·50 + 3000·50/2)/60 rev × 60 = 225 000.
    const profile = linearProfile(3000, 6000, 50);
    const pulses = tachoPulses(ttlTacho(profile, RATE, 50, 60), RATE, { ppr: 60 });
    expect(Math.abs(pulses.times.length - 225_000)).toBeLessThanOrEqual(1);
    const motion = motionFromPulses(pulses.times, 60);
    const mid = motion.times.length >> 1;
    expect(Math.abs(motion.rpm[mid] / profile.rpm(motion.times[mid]) - 1)).toBeLessThan(0.005);
  });

  test("an extra (spurious) pulse is removed", () => {
    const profile = linearProfile(1200, 1200, 5);
    const signal = ttlTacho(profile, RATE, 5, 1);
    // A glitch in the middle of a low phase: 3 samples high.
    const at = Math.round(2.035 * RATE); // 70 % into a period: the low phase
    for (let i = at; i < at + 3; i++) signal[i] = 5;
    const pulses = tachoPulses(signal, RATE, { ppr: 1 });
    expect(pulses.removed).toBe(1);
    const motion = motionFromPulses(pulses.times, 1);
    for (const r of motion.rpm) expect(Math.abs(r / 1200 - 1)).toBeLessThan(0.005);
  });

  test("an analogue tacho with noise, through the hysteresis", () => {
    const profile = linearProfile(3000, 3000, 4);
    const signal = new Float64Array(4 * RATE).map((_, i) =>
      Math.sin(2 * Math.PI * profile.angle(i / RATE)) +
      0.05 * Math.sin(2 * Math.PI * 2000 * i / RATE)
    );
    const motion = motionFromPulses(tachoPulses(signal, RATE, { ppr: 1 }).times, 1);
    for (const r of motion.rpm) expect(Math.abs(r / 3000 - 1)).toBeLessThan(0.005);
  });

  test("pulses too close for the sample rate are refused, not misread", () => {
    const signal = ttlTacho(linearProfile(4800, 4800, 1), 8192, 1, 60);
    expect(() => tachoPulses(signal, 8192, { ppr: 60 })).toThrow(/too low for this tacho/);
  });

  test("a channel that holds rpm gives the angle by integration", () => {
    const m = motionFromRpm(new Float64Array(1001).map((_, i) => 600 + i), 100);
    // ∫(600 + 100t) dt /60 from 0 to 10 s = (6000 + 5000)/60 revolutions (analytic).
    expect(Math.abs(m.angleAt(10) - 11000 / 60)).toBeLessThan(1e-9);
  });
});

describe("a tacho whose amplitude follows the speed", () => {
  // An inductive (variable-reluctance) sensor: its voltage is proportional to the rate of
  // change of flux, so to speed (common practice). 0.18 V peak at 600 rpm, 1.8 V at 6000 rpm.
  // A 60-tooth wheel (600 Hz at 600 rpm), sampled at 51.2 kHz.
  const rate = 51200, seconds = 10, ppr = 60;
  const profile = linearProfile(600, 6000, seconds);
  const inductive = () => {
    const noise = gaussianNoise(7, rate * seconds);
    return new Float64Array(rate * seconds).map((_, i) => {
      const t = i / rate;
      return (0.18 * profile.rpm(t) / 600) * Math.sin(2 * Math.PI * ppr * profile.angle(t)) +
        1e-3 * noise[i];
    });
  };

  test("a run-up 600 → 6000 rpm reads 600–6000 rpm within 0.5 %, from its first pulses", () => {
    // Truth: the analytic linear profile. The record's fixed mid-level and hysteresis (20 % of
    // the 2nd–98th percentile span, ±0.34 V) would miss every pulse under 0.34 V, i.e. the run
    // below about 1100 rpm.
    const signal = inductive();
    const pulses = tachoPulses(signal, rate, { ppr });
    // The first pulse within the first two cycles (1/600 s each at 600 rpm).
    expect(pulses.times[0]).toBeLessThan(2 / (ppr * 10));
    expect(pulses.silent).toEqual([]);
    expect(pulses.inserted).toBe(0);
    const motion = motionFromPulses(pulses.times, ppr, pulses.angles);
    let worst = 0, lowest = Infinity, highest = -Infinity;
    motion.times.forEach((t, i) => {
      worst = Math.max(worst, Math.abs(motion.rpm[i] / profile.rpm(t) - 1));
      lowest = Math.min(lowest, motion.rpm[i]);
      highest = Math.max(highest, motion.rpm[i]);
    });
    expect(worst).toBeLessThan(0.005);
    expect(Math.abs(lowest / 600 - 1)).toBeLessThan(0.005);
    expect(Math.abs(highest / 6000 - 1)).toBeLessThan(0.005);
    // The naive fixed trigger of the same record, for contrast: its first pulse comes late.
    const fixed = tachoPulses(signal, rate, { ppr, hysteresis: 0.2 * 3.4 });
    expect(fixed.times[0]).toBeGreaterThan(0.5);
  });

  test("a stretch where the tacho is silent is named, from–to seconds", () => {
    // The first 1.5 s hold only the sensor's noise (the shaft not yet turning past it).
    const signal = inductive();
    const quiet = Math.round(1.5 * rate);
    const noise = gaussianNoise(8, quiet);
    for (let i = 0; i < quiet; i++) signal[i] = 1e-3 * noise[i];
    const pulses = tachoPulses(signal, rate, { ppr });
    expect(pulses.silent.length).toBe(1);
    expect(pulses.silent[0][0]).toBe(0);
    // The first pulse within two cycles of 1.5 s (speed there 1410 rpm: 1410 pulses/s).
    expect(Math.abs(pulses.silent[0][1] - 1.5)).toBeLessThan(2 / 1410);
    const { notes } = motionOfSeries(memorySeries(signal), rate, { tacho: "n", ppr }, 10);
    // Times on the recording's axis: the record starts at 10 s.
    expect(notes.join()).toMatch(/no tacho pulse from 10–11\.5\d* s/);
  });
});

/** A missing-tooth wheel (teeth positions, `missing` teeth absent after position 0) as TTL. */
function missingToothTacho(
  profile: Profile,
  rate: number,
  seconds: number,
  teeth: number,
  missing: number,
): Float64Array {
  return new Float64Array(Math.round(rate * seconds)).map((_, i) => {
    const position = profile.angle(i / rate) * teeth;
    const tooth = Math.floor(position) % teeth;
    const high = position - Math.floor(position) < 0.5;
    return high && tooth < teeth - missing ? 5 : 0;
  });
}

describe("missing-tooth wheels", () => {
  const rate = 51200;

  test("a 60-2 wheel at 1500 rpm given as --ppr 60 --missing-teeth 2 reads 1500 rpm within 0.1 %", () => {
    // Truth: the analytic constant speed. Read as 58 plain pulses a revolution, the two
    // "missing" pulses are filled in and the speed reads 60/58 = 3.4 % high.
    const profile = linearProfile(1500, 1500, 4);
    const signal = missingToothTacho(profile, rate, 4, 60, 2);
    const pulses = tachoPulses(signal, rate, { ppr: 60, missingTeeth: 2 });
    expect(pulses.inserted).toBe(0);
    expect(pulses.references).toBe(99); // 100 revolutions: the gaps between them, and the ends'
    expect(pulses.mismatched).toBe(0);
    const motion = motionFromPulses(pulses.times, 60, pulses.angles);
    for (const r of motion.rpm) expect(Math.abs(r / 1500 - 1)).toBeLessThan(0.001);
    // The gap is the reference: the tooth after it is at a whole revolution.
    const firstAfterGap = pulses.angles.findIndex((a) => a === 0);
    expect(firstAfterGap).toBeGreaterThanOrEqual(0);
    expect(pulses.times.length).toBe(pulses.angles.length);
  });

  test("on a run-up 1000 → 4000 rpm the wheel's speed stays within 0.1 %", () => {
    const profile = linearProfile(1000, 4000, 4);
    const signal = missingToothTacho(profile, rate, 4, 60, 2);
    const pulses = tachoPulses(signal, rate, { ppr: 60, missingTeeth: 2 });
    expect(pulses.inserted).toBe(0);
    const motion = motionFromPulses(pulses.times, 60, pulses.angles);
    let worst = 0;
    motion.times.forEach((t, i) => {
      worst = Math.max(worst, Math.abs(motion.rpm[i] / profile.rpm(t) - 1));
    });
    expect(worst).toBeLessThan(0.001);
  });

  test("given as --ppr 58 without --missing-teeth, the wheel is named in a warning", () => {
    const profile = linearProfile(1500, 1500, 2);
    const signal = missingToothTacho(profile, rate, 2, 60, 2);
    const { motion, notes } = motionOfSeries(memorySeries(signal), rate, { tacho: "n", ppr: 58 });
    // What was read: 60/58 − 1 = 3.4 % high (the filled pulses).
    expect(Math.abs(motion.rpm[motion.rpm.length >> 1] / (1500 * 60 / 58) - 1)).toBeLessThan(0.001);
    expect(notes.join()).toMatch(
      /looks like a missing-tooth wheel \(60-2\).*--ppr 60 --missing-teeth 2.*3\.4 % high/,
    );
  });
});

describe("smoothing of pulse times", () => {
  test("jittered pulse times are pulled back towards the truth", () => {
    // Truth: a run-up of constant acceleration, pulse j at the analytic time where the angle
    // is j/ppr; each time jittered by a seeded uniform ±0.2 ms (a sample at 2.5 kHz). A local
    // least-squares fit over 13 pulses averages the jitter down by about √13 (common practice).
    const ppr = 4, count = 400;
    const profile = linearProfile(1200, 2400, 10);
    // θ(t) = (1200 t + 60 t²)/60 = 20 t + t² revolutions, inverted for t at θ = j/ppr.
    const truth = new Float64Array(count).map((_, j) => -10 + Math.sqrt(100 + j / ppr));
    const uniform = uniformGenerator(21);
    const measured = truth.map((t) => t + 2e-4 * (2 * uniform() - 1));
    const motion = motionFromPulses(measured, ppr);
    let before = 0, after = 0;
    for (let j = 20; j < count - 20; j++) {
      before += (measured[j] - truth[j]) ** 2;
      after += (motion.times[j] - truth[j]) ** 2;
      expect(Math.abs(motion.rpm[j] / profile.rpm(truth[j]) - 1)).toBeLessThan(0.01);
    }
    expect(Math.sqrt(after / before)).toBeLessThan(0.5);
  });
});

describe("missing-tooth wheels with teeth lost", () => {
  test("two teeth lost mid-revolution look like the gap but are not taken as the mark", () => {
    // 60-2 wheel at 1500 rpm (truth: constant speed) with teeth 20 and 21 of the first revolution
    // giving no pulse: an interval of 3 pitches, before any gap, where no revolution ends. Taking it as the
    // mark (or snapping the count to it) would put the following teeth 2/60 rev off.
    const rate = 51200, profile = linearProfile(1500, 1500, 2);
    const signal = missingToothTacho(profile, rate, 2, 60, 2);
    for (let i = 0; i < signal.length; i++) {
      const position = profile.angle(i / rate) * 60;
      if (Math.floor(position) === 20 || Math.floor(position) === 21) {
        signal[i] = 0;
      }
    }
    const pulses = tachoPulses(signal, rate, { ppr: 60, missingTeeth: 2 });
    expect(pulses.mismatched).toBe(1);
    expect(pulses.references).toBe(49); // 50 revolutions
    // Every pulse's angle is its tooth's, counted from the gap: tooth k of revolution n at
    // n + k/60 revolutions, as the analytic angle has it (its pulses rise at whole pitches).
    // Which revolution is called 0 is free: the difference is a whole number of revolutions.
    const whole = Math.round(pulses.angles[0] - profile.angle(pulses.times[0]));
    pulses.times.forEach((t, j) => {
      expect(Math.abs(pulses.angles[j] - profile.angle(t) - whole)).toBeLessThan(0.1 / 60);
    });
    const motion = motionFromPulses(pulses.times, 60, pulses.angles);
    for (const r of motion.rpm) expect(Math.abs(r / 1500 - 1)).toBeLessThan(0.001);
    const { notes } = motionOfSeries(memorySeries(signal), rate, {
      tacho: "n",
      ppr: 60,
      missingTeeth: 2,
    });
    expect(notes.join()).toMatch(/1 gap\(s\) of 3 tooth pitches came where no revolution ends/);
  });
});

describe("a narrow-pulse tacho (a once-per-revolution mark)", () => {
  // Pulses high for 1.6 % of each revolution: the 2nd and 98th percentiles both sit at the
  // resting level, so levels taken from them alone call the channel flat (common practice:
  // reflective-tape and keyphasor marks are this narrow).
  for (const activeLow of [false, true]) {
    test(`1.6 % duty, active ${activeLow ? "low" : "high"}: rpm within 0.5 % of the profile`, () => {
      const rate = 25600;
      const profile = linearProfile(1200, 3000, 10);
      const signal = new Float64Array(rate * 10).map((_, i) => {
        const turn = profile.angle(i / rate);
        const high = turn - Math.floor(turn) < 0.016;
        return high !== activeLow ? 5 : 0;
      });
      const pulses = tachoPulses(signal, rate, { ppr: 1 });
      expect(pulses.inserted).toBe(0);
      const motion = motionFromPulses(pulses.times, 1);
      let worst = 0;
      motion.times.forEach((t, i) => {
        if (t < 0.5 || t > 9.5) return;
        worst = Math.max(worst, Math.abs(motion.rpm[i] / profile.rpm(t) - 1));
      });
      expect(worst).toBeLessThan(0.005);
    });
  }

  test("a channel with no excursion at all is still flat", () => {
    expect(() => tachoPulses(new Float64Array(1000).fill(2.5), 1000, { ppr: 1 })).toThrow(
      /the tacho channel is flat/,
    );
  });
});

describe("an inductive (variable-reluctance) tacho: narrow bipolar pulses", () => {
  // Each tooth passing the pickup gives a positive lobe then a negative one (the derivative of a
  // Gaussian flux bump in shaft angle, amplitude ∝ speed; common practice), crossing zero at the
  // tooth's centre, which is the pickup's timing point (common practice). 0.055 V peak at
  // 600 rpm, 2 mV RMS noise, a 10:1 run-up. Truth: the analytic linear profile.
  // Read on rising crossings, as before this rule, the 1-pulse record below had 28 pulses
  // filled and 33 removed, rpm up to 30 % off (noise-free: 94 and 104, 43 % off).
  const cases = [
    { ppr: 1, rate: 10_000, seconds: 10, width: 0.01, timing: 0.002 },
    { ppr: 60, rate: 51_200, seconds: 4, width: 1 / 360, timing: 0.02 / 60 },
  ];
  for (const { ppr, rate, seconds, width, timing } of cases) {
    test(`${ppr} pulse(s) per revolution, 600 → 6000 rpm: timed between the lobes, rpm within 0.5 % from the first reading`, () => {
      const profile = linearProfile(600, 6000, seconds);
      const signal = inductiveTacho(profile, rate, seconds, ppr, {
        peakAt600: 0.055,
        width,
        noise: 0.002,
      });
      const pulses = tachoPulses(signal, rate, { ppr });
      expect(pulses.edge).toBe("falling");
      expect(pulses.inserted).toBe(0);
      expect(pulses.removed).toBe(0);
      expect(pulses.silent).toEqual([]);
      // Every pulse at its tooth's centre, k/ppr revolutions, within `timing` revolutions.
      pulses.times.forEach((t) => {
        const teeth = profile.angle(t) * ppr;
        expect(Math.abs(teeth - Math.round(teeth)) / ppr).toBeLessThan(timing);
      });
      // The first pulse within the first two revolutions' teeth (at 600 rpm: 0.1 s a revolution).
      expect(pulses.times[0]).toBeLessThan(2 / (10 * ppr));
      const motion = motionFromPulses(pulses.times, ppr, pulses.angles);
      let worst = 0;
      motion.times.forEach((t, i) => {
        worst = Math.max(worst, Math.abs(motion.rpm[i] / profile.rpm(t) - 1));
      });
      expect(worst).toBeLessThan(0.005);
      const { notes } = motionOfSeries(memorySeries(signal), rate, { tacho: "n", ppr });
      expect(notes.join()).toMatch(/bipolar \(as from an inductive pickup\)/);
    });
  }

  test("a TTL tacho whose falling edges are the steeper keeps its rising edges (it rests on a rail)", () => {
    // Each cycle rises over 8 samples and falls in one: by steepness alone the falling edges
    // would be taken, though this tacho is not bipolar (its median is a rail).
    const period = 80;
    const signal = new Float64Array(100 * period).map((_, i) => {
      const phase = i % period;
      return phase < 8 ? (5 * phase) / 8 : phase < 40 ? 5 : 0;
    });
    const pulses = tachoPulses(signal, 8000, { ppr: 1 });
    expect(pulses.edge).toBe("rising");
    // Rising edge k crosses 2.5 V at sample 80k + 4 (exact on the ramp, which is linear).
    // (The first starts with the record, before the envelope knows the swing: not checked.)
    expect(pulses.times.length).toBe(100);
    pulses.times.slice(1).forEach((t, k) => expect(t * 8000).toBeCloseTo((k + 1) * period + 4, 6));
  });
});

describe("silences and repairs", () => {
  test("a 0.3 s silence mid-record is named from–to and never filled; the angle is counted across it", () => {
    // Truth: the analytic profile. The 1-pulse inductive run-up of 600 → 6000 rpm in 10 s with
    // its pickup silent (noise only) from 4.5 to 4.8 s: about 15.6 revolutions at ~3050 rpm.
    // Filled as before this rule, the stretch got 15 invented pulses.
    const rate = 10_000, seconds = 10;
    const profile = linearProfile(600, 6000, seconds);
    const signal = inductiveTacho(profile, rate, seconds, 1, {
      peakAt600: 0.055,
      width: 0.01,
      noise: 0.002,
      // Teeth whose centre lies in 4.5–4.8 s give nothing (θ(4.5) = 50.6, θ(4.8) = 66.2 rev).
      absent: (k) => k > profile.angle(4.5) && k < profile.angle(4.8),
    });
    const pulses = tachoPulses(signal, rate, { ppr: 1 });
    expect(pulses.inserted).toBe(0);
    expect(pulses.silent.length).toBe(1);
    // The stretch runs between the last tooth before 4.5 s and the first after 4.8 s: within one
    // revolution (under 1/50 s there) of each.
    const [from, to] = pulses.silent[0];
    expect(from).toBeLessThanOrEqual(4.5);
    expect(4.5 - from).toBeLessThan(1 / 50);
    expect(to).toBeGreaterThanOrEqual(4.8);
    expect(to - 4.8).toBeLessThan(1 / 50);
    // Every pulse's angle, after the silence too, is its tooth's: a whole number of
    // revolutions from the analytic angle, the same one throughout.
    const whole = Math.round(pulses.angles[0] - profile.angle(pulses.times[0]));
    pulses.times.forEach((t, j) => {
      expect(Math.abs(pulses.angles[j] - profile.angle(t) - whole)).toBeLessThan(0.01);
    });
    const motion = motionFromPulses(pulses.times, 1, pulses.angles);
    motion.times.forEach((t, i) => {
      expect(Math.abs(motion.rpm[i] / profile.rpm(t) - 1)).toBeLessThan(0.005);
    });
    const { notes } = motionOfSeries(memorySeries(signal), rate, { tacho: "n", ppr: 1 });
    expect(notes.join()).toMatch(/no tacho pulse from 4\.4\d*–4\.8\d* s: .*no pulses filled in/);
    expect(notes.join()).not.toMatch(/filled in, in/);
  });

  test("one or two pulses missing in a row are still filled in (isolated gaps)", () => {
    // Constant 1200 rpm, 1 pulse/rev TTL (truth: 20 Hz); pulse 20 missing, and 50 and 51.
    const profile = linearProfile(1200, 1200, 5);
    const signal = ttlTacho(profile, 8192, 5, 1).map((v, i) => {
      const turn = Math.floor(profile.angle(i / 8192));
      return turn === 20 || turn === 50 || turn === 51 ? 0 : v;
    });
    const pulses = tachoPulses(signal, 8192, { ppr: 1 });
    expect(pulses.inserted).toBe(3);
    expect(pulses.silent).toEqual([]);
  });

  for (const [every, refused] of [[15, true], [25, false]] as const) {
    test(`every ${every}th pulse missing (1 in ${every} absent): ${refused ? "refused, naming the counts" : "read"}`, () => {
      // 1200 rpm, 1 pulse/rev TTL for 10 s: rising edges at revolutions 1…199 (the record starts
      // high), every `every`-th revolution's absent. REPAIR_LIMIT is 5 % of the pulses found:
      // 1 in 15: 13 absent, 186 found, 13 filled = 7.0 %; 1 in 25: 8 absent (the last, at
      // revolution 199, ends the record: nothing to fill), 191 found, 7 filled = 3.7 %.
      const profile = linearProfile(1200, 1200, 10);
      const signal = ttlTacho(profile, 8192, 10, 1).map((v, i) =>
        Math.floor(profile.angle(i / 8192)) % every === every - 1 ? 0 : v
      );
      const read = () => tachoPulses(signal, 8192, { ppr: 1 });
      if (refused) {
        expect(read).toThrow(
          /cannot be trusted: of 186 pulses found, 13 had to be filled in and 0 removed \(7\.0 %.*--tacho-level.*--ppr/,
        );
      } else {
        expect(read().inserted).toBe(7);
      }
    });
  }
});

describe("a missing-tooth wheel whose record ends inside its gap", () => {
  // 60-2 wheel at 1500 rpm (truth: constant speed; 25 rev/s, a pitch of 1/1500 s).
  const rate = 51200, profile = linearProfile(1500, 1500, 5);
  test("no silence is named when the record ends 2.5 pitches after the last tooth", () => {
    // The record ends half-way into the gap: 99 revolutions plus 59.5 pitches.
    const seconds = (99 + 59.5 / 60) / 25;
    const signal = missingToothTacho(profile, rate, seconds, 60, 2);
    const pulses = tachoPulses(signal, rate, { ppr: 60, missingTeeth: 2 });
    expect(pulses.silent).toEqual([]);
  });
  test("a real silence at its end (half a revolution, 30 pitches) is still named", () => {
    const seconds = (99 + 59.5 / 60) / 25;
    const signal = missingToothTacho(profile, rate, seconds, 60, 2);
    const longer = new Float64Array(signal.length + Math.round(0.02 * rate));
    longer.set(signal);
    const pulses = tachoPulses(longer, rate, { ppr: 60, missingTeeth: 2 });
    expect(pulses.silent.length).toBe(1);
    expect(pulses.silent[0][1]).toBeCloseTo(longer.length / rate, 9);
  });
});

describe("quiver orders with these tachos (end to end)", () => {
  test("the inductive 1-pulse run-up reads right (exit 0); a tacho needing 7 % repair is refused (exit 1)", async () => {
    // Truth: the analytic profile (600 → 6000 rpm in 10 s, 10 kHz, 0.055 V at 600 rpm, 2 mV).
    // Before the bipolar rule this record gave "2719 rpm step(s) from 1600 to 170450 rpm", exit 0.
    const dir = await mkdtemp("/tmp/quiver-tacho-");
    const rate = 10_000, seconds = 10;
    const profile = linearProfile(600, 6000, seconds);
    const tacho = inductiveTacho(profile, rate, seconds, 1, {
      peakAt600: 0.055,
      width: 0.01,
      noise: 0.002,
    });
    const response = orderResponse(profile, rate, seconds, [{ order: 2, rms: () => 1 }]);
    await writeFile(
      `${dir}/vr.csv`,
      recordingCsv({
        rate,
        startTime: 0,
        channels: [
          { name: "tacho", unit: "V", data: tacho },
          { name: "acc", unit: "m/s^2", data: response },
        ],
      }),
    );
    const common = ["orders", `${dir}/vr.csv`, "--rate", String(rate), "--tacho", "tacho"];
    const ok = runQuiver([
      ...common,
      "--ppr",
      "1",
      "--channels",
      "acc",
      "--orders",
      "2",
      "--rpm-step",
      "100",
      "--out",
      `${dir}/cuts.csv`,
      "--rpm-out",
      `${dir}/rpm.csv`,
    ]);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stderr).toMatch(/bipolar \(as from an inductive pickup\)/);
    const rows = (await readFile(`${dir}/rpm.csv`, "utf8")).trim().split("\n").slice(1);
    expect(rows.length).toBeGreaterThan(500); // a reading per pulse: 549 pulses in 550 revolutions
    for (const row of rows) {
      const [t, v] = row.split(",").map(Number);
      expect(Math.abs(v / profile.rpm(t) - 1)).toBeLessThan(0.005);
    }
    // A TTL tacho with 1 pulse in 15 absent needs 7 % repair and is refused (counts as in the
    // test of REPAIR_LIMIT above), and nothing is written.
    const ttl = ttlTacho(linearProfile(1200, 1200, 10), 8192, 10, 1).map((v, i) =>
      Math.floor((1200 / 60) * (i / 8192)) % 15 === 14 ? 0 : v
    );
    await writeFile(
      `${dir}/gappy.csv`,
      recordingCsv({
        rate: 8192,
        startTime: 0,
        channels: [
          { name: "tacho", unit: "V", data: ttl },
          { name: "acc", unit: "m/s^2", data: new Float64Array(ttl.length) },
        ],
      }),
    );
    const refused = runQuiver([
      "orders",
      `${dir}/gappy.csv`,
      "--rate",
      "8192",
      "--tacho",
      "tacho",
      "--ppr",
      "1",
      "--channels",
      "acc",
      "--out",
      `${dir}/gappy_cuts.csv`,
    ]);
    expect(refused.code).toBe(1);
    expect(refused.stderr).toMatch(/of 186 pulses found, 13 had to be filled in and 0 removed/);
    await expect(readFile(`${dir}/gappy_cuts.csv`, "utf8")).rejects.toThrow();
  });
});
