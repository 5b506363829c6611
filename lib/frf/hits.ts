/**
 * Finding and classifying impact-hammer hits in one continuous force
 * recording.
 *
 * Baseline: a force channel drifts (an IEPE sensor's coupling recovering, a
 * charge amplifier's drift), so the trigger is set against a local baseline,
 * not one level for the record: the record is cut into blocks of
 * `baselineSamples` (default {@linkcode DEFAULT_BASELINE_SAMPLES}), each
 * block's median is its baseline at its centre, and the baseline runs
 * linearly between block centres (held flat before the first and after the
 * last). A median ignores the hits as long as they fill well under half a
 * block (common practice: hammer pulses last 0.2 to 5 ms). The noise σ is
 * 1.4826 × the median over blocks of each block's median absolute deviation
 * from that baseline (a normal distribution's MAD is 0.6745 σ), so neither
 * drift nor hits inflate it.
 *
 * Detection: the force above its local baseline, made positive by the
 * polarity of the larger excursion. A hit starts where it crosses the
 * trigger level upwards while armed; the detector re-arms only after the
 * force has fallen below half the trigger level (hysteresis), so one pulse
 * triggers once. The default trigger level is the larger of 5 % of the
 * largest excursion and 5 σ of the noise, both common practice. Pulses that
 * rise above 5 σ but stay below a higher trigger are counted and reported
 * (`belowTrigger`), so a hit too light for the trigger is never lost
 * without a word.
 *
 * Peak: above the local baseline at the peak, refined by a parabola through
 * the largest sample and its two neighbours (the vertex lies within half a
 * sample of the largest sample, so the refinement is bounded by the
 * neighbours' difference). The overload checks use the largest sample
 * itself, the value the converter wrote.
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
import { memorySeries, type SampleSeries } from "../io/sample_series.ts";

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
  /**
   * Force peak above the local baseline, with its sign, in the channel's
   * unit: refined between samples by a parabola (see the module).
   */
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
  /**
   * Samples per block of the local baseline (see the module). Default
   * {@linkcode DEFAULT_BASELINE_SAMPLES}; at least 16.
   */
  baselineSamples?: number;
}

/** Samples per baseline block when none is given (0.05 s at 10 240 Hz). */
export const DEFAULT_BASELINE_SAMPLES = 512;

/** Multiple of the noise σ that a pulse must exceed to be counted at all (common practice). */
export const NOISE_SIGMAS = 5;

/** Share of the largest excursion that the default trigger asks for (common practice). */
export const TRIGGER_FRACTION = 0.05;

/** Hits and the settings that found them. */
export interface HitDetection {
  /** Every hit, in time order. */
  readonly hits: readonly Hit[];
  /** Trigger level used, above the local baseline. */
  readonly trigger: number;
  /** How the trigger level was chosen, in words (given, or which rule won and both values). */
  readonly triggerRule: string;
  /** The baseline's median over the blocks (its typical level). */
  readonly baseline: number;
  /** The lowest and highest block baseline: how far the baseline drifted. */
  readonly baselineRange: readonly [number, number];
  /** Samples per baseline block. */
  readonly baselineSamples: number;
  /** The noise σ about the local baseline (see the module). */
  readonly noiseSigma: number;
  /** +1 when hits push the force positive, −1 when negative. */
  readonly polarity: 1 | -1;
  /** Samples per record. */
  readonly recordSamples: number;
  /**
   * Pulses above {@linkcode NOISE_SIGMAS} σ that stayed below the trigger
   * (not hits), and the largest of their peaks (0 when none).
   */
  readonly belowTrigger: { readonly count: number; readonly largest: number };
}

/**
 * The local baseline of a series: the median of each block, linear between
 * block centres, and the noise σ from the blocks' median absolute deviations.
 */
function localBaseline(series: SampleSeries, blockSamples: number): {
  at: (i: number) => number;
  medians: Float64Array;
  sigma: number;
} {
  const n = series.length;
  const blocks = Math.max(1, Math.floor(n / blockSamples));
  const starts = new Float64Array(blocks + 1).map((_, k) => Math.floor(k * n / blocks));
  const medians = new Float64Array(blocks);
  const deviations = new Float64Array(blocks);
  const centres = new Float64Array(blocks);
  // One scratch block, read into (a series in memory hands out views: never sort those).
  const scratch = new Float64Array(Math.ceil(n / blocks) + 1);
  for (let k = 0; k < blocks; k++) {
    const block = scratch.subarray(0, starts[k + 1] - starts[k]);
    series.readInto(block, starts[k]);
    medians[k] = medianOfSorted(block.sort());
    centres[k] = (starts[k] + starts[k + 1] - 1) / 2;
  }
  const spacing = n / blocks;
  const at = (i: number): number => {
    if (blocks === 1 || i <= centres[0]) return medians[0];
    if (i >= centres[blocks - 1]) return medians[blocks - 1];
    let k = Math.min(blocks - 2, Math.max(0, Math.floor((i - centres[0]) / spacing)));
    while (k > 0 && centres[k] > i) k--;
    while (k < blocks - 2 && centres[k + 1] <= i) k++;
    const f = (i - centres[k]) / (centres[k + 1] - centres[k]);
    return medians[k] + f * (medians[k + 1] - medians[k]);
  };
  // Deviations about the baseline as drawn, so that a drift across a block does not count.
  for (let k = 0; k < blocks; k++) {
    const block = scratch.subarray(0, starts[k + 1] - starts[k]);
    series.readInto(block, starts[k]);
    for (let i = 0; i < block.length; i++) block[i] = Math.abs(block[i] - at(starts[k] + i));
    deviations[k] = medianOfSorted(block.sort());
  }
  return { at, medians, sigma: 1.4826 * medianOf(deviations) };
}

/** The median of sorted values (even count: the mean of the middle two). */
function medianOfSorted(sorted: Float64Array): number {
  const m = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[m] : (sorted[m - 1] + sorted[m]) / 2;
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
  const baselineSamples = options.baselineSamples ?? DEFAULT_BASELINE_SAMPLES;
  if (!(Number.isInteger(baselineSamples) && baselineSamples >= 16)) {
    throw new RangeError(
      `baseline blocks must be a whole number of 16 samples or more, got ${baselineSamples}`,
    );
  }
  const local = localBaseline(series, baselineSamples);
  let max = -Infinity;
  let min = Infinity;
  series.scan((chunk, offset) => {
    for (let i = 0; i < chunk.length; i++) {
      const r = chunk[i] - local.at(offset + i);
      if (r > max) max = r;
      if (r < min) min = r;
    }
  });
  const polarity: 1 | -1 = max >= -min ? 1 : -1;
  const largest = Math.max(max, -min);
  // The force above its local baseline with the hits made positive, computed where read.
  const s = (from: number, to: number) =>
    series.read(from, to).map((v, j) => polarity * (v - local.at(from + j)));
  const sigma = local.sigma;
  const noiseLevel = NOISE_SIGMAS * sigma;
  const trigger = options.trigger ?? Math.max(TRIGGER_FRACTION * largest, noiseLevel);
  if (options.trigger === undefined && !(trigger > 0)) {
    // A derived level of 0 is a fact of the data (a flat force channel), not of the options.
    throw new QuiverError(
      "the force channel is flat: nothing rises above its baseline to trigger on",
    );
  }
  if (!(trigger > 0) || !Number.isFinite(trigger)) {
    throw new RangeError(`trigger level must be a positive number, got ${trigger}`);
  }
  const fmt = (v: number) => Number(v.toPrecision(3));
  const triggerRule = options.trigger !== undefined
    ? `given: ${trigger}`
    : `derived: the larger of ${TRIGGER_FRACTION * 100} % of the largest excursion (${
      fmt(TRIGGER_FRACTION * largest)
    }) and ${NOISE_SIGMAS} noise sigma (${
      fmt(noiseLevel)
    }), above a local baseline (median of each ${baselineSamples}-sample block)`;

  const crossings: { sample: number; rearm: number; peakSample: number; peak: number }[] = [];
  let armed = true;
  // Pulses seen at the noise level: those that never reach the trigger are reported.
  let quietArmed = true, quietPeak = 0, belowCount = 0, belowLargest = 0;
  series.scan((chunk, offset) => {
    for (let j = 0; j < chunk.length; j++) {
      const i = offset + j;
      const value = polarity * (chunk[j] - local.at(i));
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
      if (noiseLevel > 0 && noiseLevel < trigger) {
        if (quietArmed && value >= noiseLevel) {
          quietArmed = false;
          quietPeak = value;
        } else if (!quietArmed) {
          if (value > quietPeak) quietPeak = value;
          if (value < noiseLevel / 2) {
            quietArmed = true;
            if (quietPeak < trigger) {
              belowCount++;
              if (quietPeak > belowLargest) belowLargest = quietPeak;
            }
          }
        }
      }
    }
  });
  if (!quietArmed && quietPeak < trigger) {
    belowCount++;
    if (quietPeak > belowLargest) belowLargest = quietPeak;
  }
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
      peak: polarity * refinedPeak(s, n, crossing.peakSample),
      pulseSamples: Math.max(1, crossing.rearm - crossing.sample),
      status,
      ...(reason !== undefined ? { reason } : {}),
    });
    c = next - 1; // crossings inside this record belong to it
  }
  let low = Infinity, high = -Infinity;
  for (const m of local.medians) {
    if (m < low) low = m;
    if (m > high) high = m;
  }
  return {
    hits,
    trigger,
    triggerRule,
    baseline: medianOf(local.medians),
    baselineRange: [low, high],
    baselineSamples,
    noiseSigma: sigma,
    polarity,
    recordSamples,
    belowTrigger: { count: belowCount, largest: belowLargest },
  };
}

/**
 * The peak through a parabola on the largest sample and its neighbours
 * (the largest sample alone at either end of the record).
 */
function refinedPeak(
  s: (from: number, to: number) => Float64Array,
  n: number,
  peakSample: number,
): number {
  if (peakSample === 0 || peakSample === n - 1) return s(peakSample, peakSample + 1)[0];
  const [a, b, c] = s(peakSample - 1, peakSample + 2);
  const curvature = a - 2 * b + c;
  // b is the largest, so curvature ≤ 0 and the vertex lies within half a sample of it.
  if (!(curvature < 0)) return b;
  const p = 0.5 * (a - c) / curvature;
  return b - 0.25 * (a - c) * p;
}
