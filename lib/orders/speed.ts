/**
 * The shaft speed of a run-up as every rpm-based analysis sees it: from a
 * tacho channel (pulses, tacho.ts; speed and angle, shaft_motion.ts) or from
 * a channel that holds rpm, the time at which the speed first passes each
 * rpm step, and the steps themselves. `orders` and the spectrogram against rpm share it, so their
 * frames sit at the same instants.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { type Recording, selectChannels } from "../io/recording.ts";
import { memorySeries, type SampleSeries } from "../io/sample_series.ts";
import { motionFromPulses, motionFromRpm, type ShaftMotion } from "./shaft_motion.ts";
import { type TachoPulses, tachoPulses } from "./tacho.ts";
import { MAX_RPM_STEPS } from "./rpm_steps.ts";

export { MAX_RPM_STEPS };

/** Where the speed comes from. Give `tacho` (with `ppr`) or `rpmChannel`. */
export interface SpeedSource {
  /** Tacho pulse channel; give this or `rpmChannel`. */
  tacho?: string;
  /** Channel that holds rpm directly; give this or `tacho`. */
  rpmChannel?: string;
  /**
   * Pulses per revolution of the tacho. Required with `tacho`. With
   * `missingTeeth`, the tooth positions of the full wheel (60 for a 60-2 wheel).
   */
  ppr?: number;
  /** Teeth missing from a missing-tooth wheel (2 for a 60-2 wheel). Default 0. */
  missingTeeth?: number;
  /** Tacho switching level. Default: automatic (see tacho.ts). */
  tachoLevel?: number;
  /** Tacho hysteresis. Default: automatic. */
  tachoHysteresis?: number;
}

/** The rpm steps to analyse. */
export interface RpmStepOptions {
  /** Lowest rpm step. Default: the recording's lowest rpm rounded up to a step. */
  rpmMin?: number;
  /** Highest rpm step. Default: the recording's highest rpm rounded down to a step. */
  rpmMax?: number;
  /** rpm between steps. Default 50. */
  rpmStep?: number;
}

/** The speed channel's name: the tacho or the rpm channel. */
export function speedChannelName(source: SpeedSource): string {
  if ((source.tacho === undefined) === (source.rpmChannel === undefined)) {
    throw new RangeError(
      "give a tacho channel (with pulses per revolution) or an rpm channel, not both",
    );
  }
  return (source.tacho ?? source.rpmChannel) as string;
}

/**
 * The shaft's motion from the recording's tacho or rpm channel, with notes on
 * repaired pulses.
 *
 * @throws {RangeError} for neither or both sources, or a bad `ppr`;
 * QuiverError when the tacho has too few pulses.
 *
 * @example
 * ```ts
 * import { shaftMotion } from "./speed.ts";
 * const rpm = new Float64Array(1001).fill(1200); // 1200 rpm for 10 s at 100 Hz
 * const { motion } = shaftMotion({ rate: 100, startTime: 0, channels: [{ name: "n", unit: "rpm", data: rpm }] }, { rpmChannel: "n" });
 * if (Math.abs(motion.angleAt(10) - 200) > 1e-9) throw new Error();
 * ```
 */
export function shaftMotion(
  recording: Recording,
  source: SpeedSource,
): { motion: ShaftMotion; notes: string[] } {
  const [channel] = selectChannels(recording, [speedChannelName(source)]);
  return motionOfSeries(memorySeries(channel.data), recording.rate, source);
}

/**
 * The shaft's motion from the speed channel's samples, in memory or spooled
 * ({@linkcode shaftMotion} for a recording in memory). A tacho is scanned
 * chunk by chunk; an rpm channel is read whole.
 *
 * @throws {RangeError} for neither or both sources, or a bad `ppr`;
 * QuiverError when the tacho has too few pulses.
 *
 * @example
 * ```ts
 * import { motionOfSeries } from "./speed.ts";
 * import { memorySeries } from "../io/sample_series.ts";
 * const { motion } = motionOfSeries(memorySeries(new Float64Array(1001).fill(600)), 100, { rpmChannel: "n" });
 * if (Math.abs(motion.angleAt(10) - 100) > 1e-9) throw new Error();
 * ```
 */
export function motionOfSeries(
  series: SampleSeries,
  rate: number,
  source: SpeedSource,
  startTime = 0,
): { motion: ShaftMotion; notes: string[] } {
  speedChannelName(source);
  if (source.rpmChannel !== undefined) {
    if (source.missingTeeth !== undefined) {
      throw new RangeError("missing teeth belong to a tacho wheel, not to an rpm channel");
    }
    return { motion: motionFromRpm(series.read(0, series.length), rate), notes: [] };
  }
  const ppr = source.ppr;
  if (ppr === undefined || !Number.isInteger(ppr) || ppr < 1) {
    throw new RangeError(`pulses per revolution must be a positive integer, got ${ppr}`);
  }
  const missingTeeth = source.missingTeeth ?? 0;
  const pulses = tachoPulses(series, rate, {
    ppr,
    missingTeeth,
    ...(source.tachoLevel !== undefined ? { level: source.tachoLevel } : {}),
    ...(source.tachoHysteresis !== undefined ? { hysteresis: source.tachoHysteresis } : {}),
  });
  return {
    motion: motionFromPulses(pulses.times, ppr, pulses.angles),
    notes: tachoNotes(pulses, ppr, missingTeeth, startTime),
  };
}

/** Seconds on the recording's time axis, for messages. */
const seconds = (t: number) => Number(t.toFixed(3)).toString();

/** What the tacho reading found, filled, dropped or recognised, for the warnings. */
function tachoNotes(
  pulses: TachoPulses,
  ppr: number,
  missingTeeth: number,
  startTime: number,
): string[] {
  const notes: string[] = [];
  const stretch = ([a, b]: readonly [number, number]) =>
    `${seconds(startTime + a)}–${seconds(startTime + b)} s`;
  const first = pulses.times[0], last = pulses.times[pulses.times.length - 1];
  for (const s of pulses.silent) {
    // Within the record the angle is counted across the silence, never pulses invented in it.
    const inside = s[0] >= first && s[1] <= last;
    notes.push(
      `no tacho pulse from ${stretch(s)}: the speed and the orders are not known there` +
        (inside
          ? " (no pulses filled in; the angle is counted across it from the speed either side)"
          : ""),
    );
  }
  if (pulses.edge === "falling") {
    notes.push(
      "the tacho pulses are bipolar (as from an inductive pickup): each is timed where it " +
        "falls through the level between its lobes",
    );
  }
  if (pulses.inserted > 0) {
    const shown = pulses.filled.slice(0, 5).map(stretch).join(", ");
    const more = pulses.filled.length > 5 ? ` and ${pulses.filled.length - 5} more` : "";
    notes.push(
      `${pulses.inserted} missing tacho pulse(s) filled in, in ${pulses.filled.length} gap(s): ${shown}${more}`,
    );
  }
  if (pulses.removed > 0) notes.push(`${pulses.removed} extra tacho pulse(s) removed`);
  if (pulses.wheelHint !== undefined) {
    const { teeth, missing } = pulses.wheelHint;
    // Filled in, the wheel counts `teeth` pulses a revolution, read as `ppr`.
    const off = 100 * (teeth / ppr - 1);
    notes.push(
      `the tacho looks like a missing-tooth wheel (${teeth}-${missing}): ${missing} pulse(s) were ` +
        `filled in once every ${teeth - missing} pulses; if it is one, give --ppr ${teeth} ` +
        `--missing-teeth ${missing}` +
        (Math.abs(off) > 1e-9
          ? ` (as read, with --ppr ${ppr}, the speed is ${Math.abs(off).toFixed(1)} % ${
            off > 0 ? "high" : "low"
          })`
          : ""),
    );
  }
  if (missingTeeth > 0) {
    if (pulses.references === 0) {
      notes.push(
        `no gap of ${missingTeeth} missing teeth was found: the angle counts teeth from the first pulse`,
      );
    }
    if (pulses.mismatched > 0) {
      notes.push(
        `${pulses.mismatched} gap(s) of ${missingTeeth + 1} tooth pitches came where no ` +
          `revolution ends: pulses lost there, counted as ${missingTeeth} missing teeth each`,
      );
    }
  }
  return notes;
}

/**
 * The lowest speed, rpm, between two times: the speed is linear between
 * readings, so the lowest is at an end or at a reading inside.
 *
 * @example
 * ```ts
 * import { lowestRpmBetween } from "./speed.ts";
 * import { motionFromRpm } from "./shaft_motion.ts";
 * const m = motionFromRpm(new Float64Array([900, 600, 1200]), 1); // readings at 0, 1, 2 s
 * if (lowestRpmBetween(m, 0.5, 1.5) !== 600) throw new Error();
 * ```
 */
export function lowestRpmBetween(motion: ShaftMotion, from: number, to: number): number {
  let lowest = Math.min(motion.rpmAt(from), motion.rpmAt(to));
  const { times, rpm } = motion;
  for (let i = 0; i < times.length; i++) {
    if (times[i] > from && times[i] < to && rpm[i] < lowest) lowest = rpm[i];
  }
  return lowest;
}

/**
 * First time (s from the first sample) at which the speed passes `rpm`, or
 * undefined when it never does.
 *
 * @example
 * ```ts
 * import { timeAtRpm } from "./speed.ts";
 * import { motionFromRpm } from "./shaft_motion.ts";
 * const ramp = new Float64Array(101).map((_, i) => 1000 + 10 * i); // 1000 → 2000 rpm in 1 s
 * if (Math.abs(timeAtRpm(motionFromRpm(ramp, 100), 1500)! - 0.5) > 1e-9) throw new Error();
 * ```
 */
export function timeAtRpm(motion: ShaftMotion, rpm: number): number | undefined {
  const { times, rpm: r } = motion;
  for (let i = 1; i < r.length; i++) {
    if ((r[i - 1] - rpm) * (r[i] - rpm) <= 0 && r[i] !== r[i - 1]) {
      return times[i - 1] + ((rpm - r[i - 1]) / (r[i] - r[i - 1])) * (times[i] - times[i - 1]);
    }
    if (r[i] === rpm) return times[i];
  }
  return undefined;
}

/** rpm steps and the recorded speed range. */
export interface RpmSteps {
  /** The steps, rpm, rising. */
  readonly steps: readonly number[];
  /** Lowest step. */
  readonly rpmMin: number;
  /** Highest step. */
  readonly rpmMax: number;
  /** rpm between steps. */
  readonly rpmStep: number;
  /** Lowest and highest recorded speed, rpm. */
  readonly recorded: readonly [number, number];
}

/**
 * The rpm steps inside the recorded speed range.
 *
 * @throws {RangeError} for a step that is not positive or an empty range;
 * QuiverError when the recorded speed does not cover the asked range, or
 * (usage) when the step makes more than {@linkcode MAX_RPM_STEPS} steps.
 *
 * @example
 * ```ts
 * import { rpmSteps } from "./speed.ts";
 * import { motionFromRpm } from "./shaft_motion.ts";
 * const ramp = new Float64Array(101).map((_, i) => 1010 + 10 * i); // 1010 → 2010 rpm
 * const s = rpmSteps(motionFromRpm(ramp, 100), { rpmStep: 250 });
 * if (s.steps.join() !== "1250,1500,1750,2000") throw new Error();
 * ```
 */
export function rpmSteps(motion: ShaftMotion, options: RpmStepOptions = {}): RpmSteps {
  const step = options.rpmStep ?? 50;
  if (!(step > 0)) throw new RangeError(`the rpm step must be positive, got ${step}`);
  let lowest = Infinity, highest = -Infinity;
  for (const r of motion.rpm) {
    lowest = Math.min(lowest, r);
    highest = Math.max(highest, r);
  }
  const rpmMin = options.rpmMin ?? Math.ceil(lowest / step) * step;
  const rpmMax = options.rpmMax ?? Math.floor(highest / step) * step;
  if (!(rpmMax > rpmMin)) throw new RangeError(`the rpm range ${rpmMin}–${rpmMax} is empty`);
  if (rpmMin < lowest || rpmMax > highest) {
    throw new QuiverError(
      `the recording's speed spans ${lowest.toFixed(1)}–${
        highest.toFixed(1)
      } rpm, which does not cover the requested ${formatNumber(rpmMin)}–${
        formatNumber(rpmMax)
      } rpm`,
    );
  }
  // Counted before any is made: a tiny step would otherwise fill memory one push at a time.
  const count = wholeSteps((rpmMax - rpmMin) / step) + 1;
  if (count > MAX_RPM_STEPS) {
    throw new QuiverError(
      `an rpm step of ${step} makes ${count} steps from ${formatNumber(rpmMin, 8)} to ${
        formatNumber(rpmMax, 8)
      } rpm; quiver takes at most ${MAX_RPM_STEPS}, so the smallest step here is ${
        formatNumber((rpmMax - rpmMin) / (MAX_RPM_STEPS - 1), 6)
      } rpm`,
      {},
      "usage",
    );
  }
  const steps: number[] = [];
  for (let r = rpmMin; r <= rpmMax + 1e-9; r += step) steps.push(r);
  return { steps, rpmMin, rpmMax, rpmStep: step, recorded: [lowest, highest] };
}

/** The speed source as written into a result's metadata. */
export function speedSourceMetadata(source: SpeedSource): Record<string, unknown> {
  return source.tacho !== undefined
    ? {
      tacho: source.tacho,
      ppr: source.ppr,
      missing_teeth: source.missingTeeth ?? 0,
      // Which trigger read the pulses: following the pulse envelope, or fixed by the caller.
      trigger: source.tachoLevel !== undefined || source.tachoHysteresis !== undefined
        ? "fixed"
        : "envelope",
    }
    : { rpm_channel: source.rpmChannel };
}

/** floor(q), except that a q within rounding (1e-12 relative) of a whole number is that number. */
function wholeSteps(q: number): number {
  const near = Math.round(q);
  return Math.abs(q - near) <= 1e-12 * Math.max(1, near) ? near : Math.floor(q);
}
