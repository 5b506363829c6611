/**
 * A shaft's angle and speed against time, from tacho pulses or from a
 * channel that holds rpm.
 *
 * Speed: pulse times are smoothed by a local quadratic fit of angle against
 * time (see {@linkcode motionFromPulses}), the speed read from the fit, and
 * the angle θ(t) interpolated between the smoothed pulses by a monotone
 * cubic (Fritsch–Carlson 1980).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";

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
 * j/ppr revolutions (or `angles[j]`, as on a missing-tooth wheel), while its
 * time carries the sampling's jitter (up to a sample for a TTL edge). So the
 * angle is fitted as a quadratic function of time over the pulses within
 * max(ppr, 6) either side (local least squares, exact for constant angular
 * acceleration however much the speed changes across the window; time as a
 * quadratic of angle is not, and read the low end of a tenfold run-up 3 %
 * high): each pulse's smoothed time is where the fit reaches its angle (one
 * Newton step from the measured time), and the speed is 60·dθ/dt there, in
 * rpm.
 *
 * @example
 * ```ts
 * import { motionFromPulses } from "./shaft_motion.ts";
 * const times = new Float64Array(40).map((_, j) => j * 0.01); // 2 pulses/rev at 3000 rpm
 * const m = motionFromPulses(times, 2);
 * if (Math.abs(m.rpmAt(0.2) - 3000) > 1e-6 || Math.abs(m.angleAt(0.1) - 5) > 1e-9) throw new Error();
 * ```
 */
export function motionFromPulses(
  times: Float64Array,
  ppr: number,
  angles?: Float64Array,
): ShaftMotion {
  const n = times.length;
  const half = Math.max(ppr, 6);
  const angle = angles ?? new Float64Array(n).map((_, j) => j / ppr);
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
    polynomialFit(angle, times, { lo, hi, origin: times[j], degree }, scratch, fit);
    // One Newton step to where the fit reaches the pulse's angle. The speed is read at the
    // measured time: the two are a sample's jitter apart, too little for the speed to change.
    smoothed[j] = times[j] + (angle[j] - fit[0]) / fit[1];
    rpm[j] = 60 * fit[1];
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
 * Least-squares polynomial y ≈ Σ c_k·u^k (k ≤ degree ≤ 2), u = x − x₀, over
 * points lo…hi (called with y the angle and x the time: c₀ is the fitted
 * angle at t₀, c₁ = dθ/dt there); writes the coefficients to `out`. Normal
 * equations, solved by Gaussian elimination with partial pivoting (well
 * conditioned: u is measured from a point of the window). `scratch` holds the augmented matrix row by row and the
 * powers of u after it (at least 17 values): one fit per pulse allocates
 * nothing.
 */
function polynomialFit(
  y: Float64Array,
  x: Float64Array,
  window: { lo: number; hi: number; origin: number; degree: number },
  scratch: Float64Array,
  out: Float64Array,
): void {
  const { lo, hi, origin, degree } = window;
  const m = degree + 1, w = m + 1; // unknowns; width of a row of the augmented matrix
  const powersAt = m * w, powerCount = 2 * m - 1;
  scratch.fill(0, 0, m * w);
  for (let i = lo; i <= hi; i++) {
    const u = x[i] - origin;
    scratch[powersAt] = 1;
    for (let k = 1; k < powerCount; k++) scratch[powersAt + k] = scratch[powersAt + k - 1] * u;
    for (let r = 0; r < m; r++) {
      for (let c = 0; c < m; c++) scratch[r * w + c] += scratch[powersAt + r + c];
      scratch[r * w + m] += y[i] * scratch[powersAt + r];
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
 * import { motionFromRpm } from "./shaft_motion.ts";
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
