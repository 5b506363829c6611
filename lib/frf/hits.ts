/**
 * Finding and classifying impact-hammer hits in one continuous force
 * recording.
 *
 * Detection: the force's baseline (median) is removed and its polarity taken
 * from the larger excursion. A hit starts where the force crosses the
 * trigger level upwards while armed; the detector re-arms only after the
 * force has fallen below half the trigger level (hysteresis), so one pulse
 * triggers once. The default trigger level is the larger of 5 % of the
 * largest force and 5 σ of the noise (σ from the median absolute deviation),
 * both common practice.
 *
 * Classification of each hit's record (pretrigger + record length):
 * - `short`: the record runs off either end of the file;
 * - `overload`: a flat top at the peak (a plateau within the noise, see
 *   `plateauAtPeak`; exactly equal samples as a clipped converter writes
 *   are the noise-free case) or a peak at or above the stated range;
 * - `double`: another trigger crossing inside the record, the classic rebound;
 * - `accepted`: none of these.
 * The first that applies, in this order, is the hit's status.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { medianOf } from "../extent.ts";
import { medianOfSeries, memorySeries, type SampleSeries } from "../io/sample_series.ts";

/** What became of a hit. */
export type HitStatus = "accepted" | "double" | "overload" | "short";

/** One detected hit. */
export interface Hit {
  /** 1-based number in time order. */
  readonly hit: number;
  /** Sample of the trigger crossing. */
  readonly sample: number;
  /** Sample of the force peak. */
  readonly peakSample: number;
  /** Force peak above the baseline, with its sign, in the channel's unit. */
  readonly peak: number;
  /** Samples from the crossing until the force fell below the re-arm level. */
  readonly pulseSamples: number;
  /** The classification. */
  readonly status: HitStatus;
  /** Why a hit was not accepted, in words. */
  readonly reason?: string;
}

/** Options of {@linkcode findHits}. */
export interface HitOptions {
  /** Trigger level above the baseline, in the force's unit. Default: derived (see module). */
  trigger?: number;
  /** Samples of pre-trigger in each record. Required. */
  pretriggerSamples: number;
  /**
   * Samples per record. Default: the largest power of two that fits in 90 %
   * of the median spacing of the crossings, less the pre-trigger.
   */
  recordSamples?: number;
  /** Full-scale range of the force channel; a peak at or above it is an overload. Default: none. */
  range?: number;
}

/** Hits and the settings that found them. */
export interface HitDetection {
  /** Every hit, in time order. */
  readonly hits: readonly Hit[];
  /** Trigger level used, above the baseline. */
  readonly trigger: number;
  /** Baseline removed from the force (median). */
  readonly baseline: number;
  /** +1 when hits push the force positive, −1 when negative. */
  readonly polarity: 1 | -1;
  /** Samples per record. */
  readonly recordSamples: number;
}

/**
 * Whether the pulse around `peakSample` of `s` (baseline removed, positive)
 * has a flat top. A converter that clips holds its top code, and the
 * conditioning chain after an overloaded stage adds a little noise to that
 * plateau, so samples count as "at the top" within 4 σ of the noise
 * (`sigma`) of the peak. A smooth pulse also has a few such samples, more
 * the wider the pulse: near its peak a half-sine of half-height width W
 * falls as cos(π·t/(1.5·W)), so within a tolerance δ of its peak P it has
 * about 1 + 2·(1.5·W/π)·acos(1 − δ/P) samples. The top is flat when it holds
 * at least 3 samples and at least twice that many.
 */
function plateauAtPeak(
  s: (from: number, to: number) => Float64Array,
  n: number,
  peakSample: number,
  sigma: number,
): { flat: boolean; samples: number; tolerance: number; smooth: number } {
  const peak = s(peakSample, peakSample + 1)[0];
  const tolerance = Math.max(4 * sigma, 1e-9 * peak);
  // Samples at or above `level` either side of the peak, read a stretch at a time.
  const widthAbove = (level: number) => {
    let w = 1;
    const STEP = 4096;
    outer: for (let at = peakSample + 1; at < n; at += STEP) {
      const part = s(at, Math.min(n, at + STEP));
      for (let j = 0; j < part.length; j++) {
        if (part[j] < level) break outer;
        w++;
      }
    }
    outer: for (let end = peakSample; end > 0; end -= STEP) {
      const part = s(Math.max(0, end - STEP), end);
      for (let j = part.length - 1; j >= 0; j--) {
        if (part[j] < level) break outer;
        w++;
      }
    }
    return w;
  };
  const samples = widthAbove(peak - tolerance);
  const halfWidth = widthAbove(peak / 2);
  const smooth = 1 +
    2 * (1.5 * halfWidth / Math.PI) * Math.acos(Math.max(-1, 1 - tolerance / peak));
  return { flat: samples >= Math.max(3, 2 * smooth), samples, tolerance, smooth };
}

/**
 * Finds and classifies the hits on a force channel.
 *
 * @throws {QuiverError} when no hit crosses the trigger, or the record
 * length cannot be derived from fewer than two hits.
 *
 * @example
 * ```ts
 * import { findHits } from "./hits.ts";
 * const f = new Float64Array(4000);
 * for (const at of [500, 1500, 2500]) for (let i = 0; i < 10; i++) f[at + i] = 100 * Math.sin(Math.PI * (i + 0.5) / 10);
 * const d = findHits(f, { pretriggerSamples: 20 });
 * if (d.hits.length !== 3 || d.hits.some((h) => h.status !== "accepted")) throw new Error();
 * ```
 */
export function findHits(
  force: Float64Array | SampleSeries,
  options: HitOptions,
): HitDetection {
  const series = force instanceof Float64Array ? memorySeries(force) : force;
  const n = series.length;
  if (n === 0) throw new QuiverError("the force channel is empty");
  // The median, exactly as a sort of the whole record gives it (even n: mean of the middle two).
  const baseline = medianOfSeries(series);
  let max = -Infinity;
  let min = Infinity;
  series.scan((chunk) => {
    for (let i = 0; i < chunk.length; i++) {
      max = Math.max(max, chunk[i] - baseline);
      min = Math.min(min, chunk[i] - baseline);
    }
  });
  const polarity: 1 | -1 = max >= -min ? 1 : -1;
  // The force with the baseline removed and the hits made positive, computed where read.
  const shifted = (v: number) => polarity * (v - baseline);
  const s = (from: number, to: number) => series.read(from, to).map(shifted);
  const deviation = (v: number) => Math.abs(shifted(v));
  const sigma = 1.4826 *
    medianOfSeries(series, deviation);
  const trigger = options.trigger ?? Math.max(0.05 * Math.max(max, -min), 5 * sigma);
  if (options.trigger === undefined && !(trigger > 0)) {
    // A derived level of 0 is a fact of the data (a flat force channel), not of the options.
    throw new QuiverError(
      "the force channel is flat: nothing rises above its baseline to trigger on",
    );
  }
  if (!(trigger > 0) || !Number.isFinite(trigger)) {
    throw new RangeError(`trigger level must be a positive number, got ${trigger}`);
  }

  const crossings: { sample: number; rearm: number; peakSample: number; peak: number }[] = [];
  let armed = true;
  series.scan((chunk, offset) => {
    for (let j = 0; j < chunk.length; j++) {
      const i = offset + j;
      const value = shifted(chunk[j]);
      if (armed && value >= trigger) {
        armed = false;
        crossings.push({ sample: i, rearm: n, peakSample: i, peak: value });
      } else if (!armed) {
        const current = crossings[crossings.length - 1];
        if (value > current.peak) {
          current.peakSample = i;
          current.peak = value;
        }
        if (value < trigger / 2) {
          armed = true;
          current.rearm = i;
        }
      }
    }
  });
  if (crossings.length === 0) {
    throw new QuiverError(`no hit reaches the trigger level of ${trigger} above the baseline`);
  }

  let recordSamples = options.recordSamples;
  if (recordSamples === undefined) {
    if (crossings.length < 2) {
      throw new QuiverError(
        "one hit only: give the record length, it cannot be derived from hit spacing",
        {},
        "usage",
      );
    }
    const spacing = medianOf(
      new Float64Array(crossings.slice(1).map((c, i) => c.sample - crossings[i].sample)),
    );
    const room = Math.floor(0.9 * spacing) - options.pretriggerSamples;
    if (room < 8) {
      throw new QuiverError(
        "hits are too close together to derive a record length; give it",
        {},
        "usage",
      );
    }
    recordSamples = 2 ** Math.floor(Math.log2(room));
  }

  const hits: Hit[] = [];
  for (let c = 0; c < crossings.length; c++) {
    const crossing = crossings[c];
    const start = crossing.sample - options.pretriggerSamples;
    const end = start + recordSamples;
    let next = c + 1;
    while (next < crossings.length && crossings[next].sample < end) next++;
    const peak = crossing.peak;
    const plateau = plateauAtPeak(s, n, crossing.peakSample, sigma);
    let status: HitStatus = "accepted";
    let reason: string | undefined;
    if (start < 0 || end > n) {
      status = "short";
      reason = start < 0
        ? "the pre-trigger starts before the file"
        : "the record runs past the end of the file";
    } else if (plateau.flat || (options.range !== undefined && peak >= options.range)) {
      status = "overload";
      reason = plateau.flat
        ? `flat top of ${plateau.samples} samples within ${
          Number(plateau.tolerance.toPrecision(2))
        } of the peak, where a smooth pulse of this width has ${
          Number(plateau.smooth.toPrecision(2))
        }`
        : `peak ${peak} at or above the range ${options.range}`;
    } else if (next > c + 1) {
      status = "double";
      reason = `${next - c - 1} more impact(s) inside the record, the first ${
        crossings[c + 1].sample - crossing.sample
      } samples after the trigger`;
    }
    hits.push({
      hit: hits.length + 1,
      sample: crossing.sample,
      peakSample: crossing.peakSample,
      peak: polarity * peak,
      pulseSamples: Math.max(1, crossing.rearm - crossing.sample),
      status,
      ...(reason !== undefined ? { reason } : {}),
    });
    c = next - 1; // crossings inside this record belong to it
  }
  return { hits, trigger, baseline, polarity, recordSamples };
}
