/**
 * Shaft speed and angle from a tachometer channel.
 *
 * Pulses: a Schmitt trigger on the tacho signal. The switching level is the
 * midpoint of the signal's 2nd and 98th percentiles and the hysteresis 20 %
 * of that span (both overridable), so analogue and TTL tachos work alike.
 * Each pulse's time is the sub-sample instant, by linear interpolation,
 * where the signal last crossed the level on its way up.
 *
 * Cleaning: an interval more than 1.5 times the local median (of the 11
 * around it) is a gap of n ≈ interval/median pulses, filled evenly; one
 * shorter than half the median comes from an extra pulse, which is dropped.
 *
 * Speed: each pulse advances 1/ppr revolution; pulse times are smoothed by
 * a local quadratic fit of time against angle (see
 * {@linkcode motionFromPulses}), the speed read from the fit, and the angle
 * θ(t) interpolated between the smoothed pulses by a monotone cubic
 * (Fritsch–Carlson 1980).
 *
 * @module
 */
import { minOf } from "../extent.ts";
import { QuiverError } from "../errors.ts";
import { kthSmallestOfMany, memorySeries, type SampleSeries } from "../io/sample_series.ts";

/** Options of {@linkcode tachoPulses}. */
export interface TachoOptions {
  /** Pulses per revolution. Required. */
  ppr: number;
  /** Switching level. Default: midpoint of the 2nd and 98th percentiles. */
  level?: number;
  /** Hysteresis (full width). Default: 20 % of the 2nd–98th percentile span. */
  hysteresis?: number;
}

/** Cleaned pulse times and what was repaired. */
export interface TachoPulses {
  /** Pulse times, s, strictly increasing. */
  readonly times: Float64Array;
  /** Pulses inserted into gaps. */
  readonly inserted: number;
  /** Extra pulses removed. */
  readonly removed: number;
  /** Switching level used. */
  readonly level: number;
  /** Hysteresis used. */
  readonly hysteresis: number;
}

/** The p-th percentile as the value at rank round(p/100·(n − 1)) of the sorted record, exactly. */
/** The samples at the given percentiles (nearest rank), in one set of passes. */
function percentiles(series: SampleSeries, ps: readonly number[]): number[] {
  const n = series.length;
  const rank = (p: number) => Math.min(n - 1, Math.max(0, Math.round((p / 100) * (n - 1))));
  return kthSmallestOfMany(series, ps.map(rank));
}

/** Intervals either side in a local median. */
const MEDIAN_HALF = 5;

/**
 * The median of values[i − 5 … i + 5] (fewer at the ends; the upper middle
 * of an even count), sorted by insertion in `scratch` (11 values or more):
 * called for every pulse interval, it allocates nothing.
 */
function localMedian(values: readonly number[], i: number, scratch: Float64Array): number {
  const from = Math.max(0, i - MEDIAN_HALF);
  const count = Math.min(values.length, i + MEDIAN_HALF + 1) - from;
  for (let k = 0; k < count; k++) {
    const v = values[from + k];
    let p = k;
    for (; p > 0 && scratch[p - 1] > v; p--) scratch[p] = scratch[p - 1];
    scratch[p] = v;
  }
  return scratch[count >> 1];
}

/**
 * Finds and cleans the tacho pulses.
 *
 * @throws {QuiverError} when fewer than 3 pulses are found.
 *
 * @example
 * ```ts
 * import { tachoPulses } from "./tacho.ts";
 * // 10 Hz square wave at 1 kHz: pulses 0.1 s apart.
 * const x = new Float64Array(1000).map((_, i) => (Math.floor(i / 50) % 2 === 0 ? 0 : 5));
 * const p = tachoPulses(x, 1000, { ppr: 1 });
 * if (p.times.length !== 10 || Math.abs(p.times[1] - p.times[0] - 0.1) > 1e-9) throw new Error();
 * ```
 */
export function tachoPulses(
  signal: Float64Array | SampleSeries,
  rate: number,
  options: TachoOptions,
): TachoPulses {
  const series = signal instanceof Float64Array ? memorySeries(signal) : signal;
  if (series.length < 2) throw new QuiverError("the tacho channel is flat: no pulses to find");
  const [low, high] = percentiles(series, [2, 98]);
  const level = options.level ?? (low + high) / 2;
  const hysteresis = options.hysteresis ?? 0.2 * (high - low);
  if (!(hysteresis > 0)) {
    throw new QuiverError("the tacho channel is flat: no pulses to find");
  }
  const upper = level + hysteresis / 2;
  const lower = level - hysteresis / 2;
  const raw: number[] = [];
  let armed = false;
  let lastCross = NaN;
  let previous = NaN;
  // A Schmitt trigger over the record chunk by chunk; `previous` carries the last sample across.
  // The state is copied into locals for each chunk's loop (captured variables cost more per
  // sample than the comparisons) and stored back after it.
  series.scan((chunk, offset) => {
    let isArmed = armed, cross = lastCross, before = previous;
    for (let j = 0; j < chunk.length; j++) {
      const i = offset + j;
      const value = chunk[j];
      if (i === 0) {
        isArmed = value < lower;
        before = value;
        continue;
      }
      if (before < level && value >= level) {
        cross = (i - 1 + (level - before) / (value - before)) / rate;
      }
      if (isArmed && value >= upper) {
        raw.push(Number.isNaN(cross) ? i / rate : cross);
        isArmed = false;
      } else if (!isArmed && value <= lower) {
        isArmed = true;
      }
      before = value;
    }
    armed = isArmed;
    lastCross = cross;
    previous = before;
  });
  if (raw.length < 3) {
    throw new QuiverError(
      `only ${raw.length} tacho pulse(s) found; check the channel, level and hysteresis`,
    );
  }
  // Drop extra pulses first: of the two pulses bounding a short interval,
  // the spurious one is the one whose removal leaves an interval nearest
  // the local median.
  let removed = 0;
  const scratch = new Float64Array(2 * MEDIAN_HALF + 1);
  const times = raw.slice();
  const gaps = times.slice(1).map((t, k) => t - times[k]);
  for (let i = 0; i < gaps.length;) {
    const intervals = gaps;
    const median = localMedian(intervals, i, scratch);
    if (intervals[i] >= 0.5 * median) {
      i++;
      continue;
    }
    const mergeBefore = i > 0 ? Math.abs(intervals[i - 1] + intervals[i] - median) : Infinity;
    const mergeAfter = i + 1 < intervals.length
      ? Math.abs(intervals[i] + intervals[i + 1] - median)
      : Infinity;
    // Removing pulse p merges the two intervals on either side of it.
    const pulse = mergeBefore <= mergeAfter ? i : i + 1;
    times.splice(pulse, 1);
    if (pulse === 0) gaps.splice(0, 1);
    else if (pulse === times.length) gaps.splice(pulse - 1, 1);
    else gaps.splice(pulse - 1, 2, times[pulse] - times[pulse - 1]);
    removed++;
    i = Math.max(0, i - 1);
  }
  let inserted = 0;
  const intervals = times.slice(1).map((t, i) => t - times[i]);
  const medians = new Float64Array(intervals.length);
  for (let i = 0; i < intervals.length; i++) medians[i] = localMedian(intervals, i, scratch);
  const shortest = minOf(medians);
  if (shortest * rate < 3) {
    throw new QuiverError(
      `tacho pulses come only ${
        (shortest * rate).toFixed(1)
      } samples apart: the sample rate is too low for this tacho (fewer pulses per revolution, or record faster)`,
    );
  }
  const filled: number[] = [times[0]];
  intervals.forEach((interval, i) => {
    const n = Math.round(interval / medians[i]);
    if (interval > 1.5 * medians[i] && n >= 2) {
      for (let j = 1; j < n; j++) filled.push(times[i] + (j * interval) / n);
      inserted += n - 1;
    }
    filled.push(times[i + 1]);
  });
  return { times: new Float64Array(filled), inserted, removed, level, hysteresis };
}

/** A shaft's angle and speed against time. */
export interface ShaftMotion {
  /** Times of the speed readings, s. */
  readonly times: Float64Array;
  /** Speed at those times, rpm. */
  readonly rpm: Float64Array;
  /** Angle in revolutions at any time within the pulses' span (monotone cubic). */
  angleAt(time: number): number;
  /** Speed in rpm at any time (linear between readings). */
  rpmAt(time: number): number;
  /** First and last time where the angle is known. */
  readonly span: readonly [number, number];
}

/** Monotone cubic Hermite interpolant through (x, y) (Fritsch & Carlson 1980). */
function monotoneCubic(x: Float64Array, y: Float64Array): (t: number) => number {
  const n = x.length;
  const slope = new Float64Array(n - 1).map((_, i) => (y[i + 1] - y[i]) / (x[i + 1] - x[i]));
  const m = new Float64Array(n);
  m[0] = slope[0];
  m[n - 1] = slope[n - 2];
  for (let i = 1; i < n - 1; i++) {
    // Weighted harmonic mean of neighbouring slopes (Fritsch–Butland form), keeps monotone.
    const h0 = x[i] - x[i - 1], h1 = x[i + 1] - x[i];
    const s0 = slope[i - 1], s1 = slope[i];
    m[i] = s0 * s1 <= 0 ? 0 : (3 * (h0 + h1)) / ((2 * h1 + h0) / s0 + (h1 + 2 * h0) / s1);
  }
  return (t: number) => {
    let lo = 0, hi = n - 1;
    if (t <= x[0]) return y[0] + m[0] * (t - x[0]);
    if (t >= x[n - 1]) return y[n - 1] + m[n - 1] * (t - x[n - 1]);
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (x[mid] <= t) lo = mid;
      else hi = mid;
    }
    const h = x[hi] - x[lo];
    const s = (t - x[lo]) / h;
    const h00 = (1 + 2 * s) * (1 - s) * (1 - s), h10 = s * (1 - s) * (1 - s);
    const h01 = s * s * (3 - 2 * s), h11 = s * s * (s - 1);
    return h00 * y[lo] + h10 * h * m[lo] + h01 * y[hi] + h11 * h * m[hi];
  };
}

function linear(x: Float64Array, y: Float64Array): (t: number) => number {
  return (t: number) => {
    if (t <= x[0]) return y[0];
    if (t >= x[x.length - 1]) return y[y.length - 1];
    let lo = 0, hi = x.length - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (x[mid] <= t) lo = mid;
      else hi = mid;
    }
    return y[lo] + ((t - x[lo]) / (x[hi] - x[lo])) * (y[hi] - y[lo]);
  };
}

/**
 * Shaft motion from cleaned pulse times. The angle at pulse j is exactly
 * j/ppr revolutions, while its time carries the sampling's jitter (up to a
 * sample for a TTL edge). So time is fitted as a quadratic function of angle
 * over the pulses within max(ppr, 6) either side (local least squares, exact
 * for constant angular acceleration): the fit gives each pulse a smoothed
 * time and the speed 60/(dt/dθ) in rpm.
 *
 * @example
 * ```ts
 * import { motionFromPulses } from "./tacho.ts";
 * const times = new Float64Array(40).map((_, j) => j * 0.01); // 2 pulses/rev at 3000 rpm
 * const m = motionFromPulses(times, 2);
 * if (Math.abs(m.rpmAt(0.2) - 3000) > 1e-6 || Math.abs(m.angleAt(0.1) - 5) > 1e-9) throw new Error();
 * ```
 */
export function motionFromPulses(times: Float64Array, ppr: number): ShaftMotion {
  const n = times.length;
  const half = Math.max(ppr, 6);
  const angle = new Float64Array(n).map((_, j) => j / ppr);
  const smoothed = new Float64Array(n);
  const rpm = new Float64Array(n);
  const scratch = new Float64Array(17), fit = new Float64Array(3);
  for (let j = 0; j < n; j++) {
    // A window of 2·half + 1 pulses, shifted rather than cut at the ends of the record: a
    // one-sided fit over half the pulses reads the end speeds off by the edge-time noise
    // (a TTL edge's time is known to ±½ sample). A cubic at the ends was tried: its lower
    // bias is lost to more noise.
    const lo = Math.max(0, Math.min(j - half, n - 1 - 2 * half));
    const hi = Math.min(n - 1, lo + 2 * half);
    const degree = Math.min(hi - lo, 2);
    if (degree < 1) {
      smoothed[j] = times[j];
      rpm[j] = NaN;
      continue;
    }
    polynomialFit(times, angle, { lo, hi, origin: angle[j], degree }, scratch, fit);
    smoothed[j] = fit[0];
    rpm[j] = 60 / fit[1];
  }
  for (let j = 1; j < n; j++) {
    if (!(smoothed[j] > smoothed[j - 1])) {
      throw new QuiverError(
        "the tacho pulses do not give a steadily turning shaft (time runs backwards after smoothing)",
      );
    }
  }
  return {
    times: smoothed,
    rpm,
    angleAt: monotoneCubic(smoothed, angle),
    rpmAt: linear(smoothed, rpm),
    span: [smoothed[0], smoothed[n - 1]],
  };
}

/**
 * Least-squares polynomial t ≈ Σ c_k·u^k (k ≤ degree ≤ 2), u = θ − θ₀, over
 * pulses lo…hi; writes the coefficients to `out` (c₀ is the smoothed time
 * at θ₀, c₁ = dt/dθ there). Normal equations, solved by Gaussian
 * elimination with partial pivoting (well conditioned: u is centred on the
 * window's pulses). `scratch` holds the augmented matrix row by row and the
 * powers of u after it (at least 17 values): one fit per pulse allocates
 * nothing.
 */
function polynomialFit(
  times: Float64Array,
  angle: Float64Array,
  window: { lo: number; hi: number; origin: number; degree: number },
  scratch: Float64Array,
  out: Float64Array,
): void {
  const { lo, hi, origin, degree } = window;
  const m = degree + 1, w = m + 1; // unknowns; width of a row of the augmented matrix
  const powersAt = m * w, powerCount = 2 * m - 1;
  scratch.fill(0, 0, m * w);
  for (let i = lo; i <= hi; i++) {
    const u = angle[i] - origin;
    scratch[powersAt] = 1;
    for (let k = 1; k < powerCount; k++) scratch[powersAt + k] = scratch[powersAt + k - 1] * u;
    for (let r = 0; r < m; r++) {
      for (let c = 0; c < m; c++) scratch[r * w + c] += scratch[powersAt + r + c];
      scratch[r * w + m] += times[i] * scratch[powersAt + r];
    }
  }
  for (let col = 0; col < m; col++) {
    let pivot = col;
    for (let r = col + 1; r < m; r++) {
      if (Math.abs(scratch[r * w + col]) > Math.abs(scratch[pivot * w + col])) pivot = r;
    }
    if (pivot !== col) {
      for (let c = 0; c < w; c++) {
        const held = scratch[col * w + c];
        scratch[col * w + c] = scratch[pivot * w + c];
        scratch[pivot * w + c] = held;
      }
    }
    for (let r = col + 1; r < m; r++) {
      const f = scratch[r * w + col] / scratch[col * w + col];
      for (let c = col; c <= m; c++) scratch[r * w + c] -= f * scratch[col * w + c];
    }
  }
  for (let r = m - 1; r >= 0; r--) {
    let sum = scratch[r * w + m];
    for (let c = r + 1; c < m; c++) sum -= scratch[r * w + c] * out[c];
    out[r] = sum / scratch[r * w + r];
  }
}

/**
 * Shaft motion from a channel that already holds rpm: angle by trapezoidal
 * integration of rpm/60.
 *
 * @example
 * ```ts
 * import { motionFromRpm } from "./tacho.ts";
 * const m = motionFromRpm(new Float64Array(1001).fill(600), 100);
 * if (Math.abs(m.angleAt(10) - 100) > 1e-9) throw new Error();
 * ```
 */
export function motionFromRpm(rpm: Float64Array, rate: number): ShaftMotion {
  if (rpm.some((v) => !(v > 0))) {
    throw new QuiverError(
      "the rpm channel holds values of 0 or below; order tracking needs a turning shaft",
    );
  }
  const times = new Float64Array(rpm.length).map((_, i) => i / rate);
  const angle = new Float64Array(rpm.length);
  for (let i = 1; i < rpm.length; i++) {
    angle[i] = angle[i - 1] + ((rpm[i - 1] + rpm[i]) / 120) / rate;
  }
  return {
    times,
    rpm: rpm.slice(),
    angleAt: linear(times, angle),
    rpmAt: linear(times, rpm),
    span: [0, times[times.length - 1]],
  };
}
