/**
 * Resampling a time signal to equal angle increments, band-limited.
 *
 * Each output sample at shaft angle θ is a windowed-sinc interpolation of
 * the time samples around the instant t(θ), with a cutoff of 0.45 of the
 * local output rate (the angle rate times samples per revolution), capped
 * at 0.45 of the input rate. Content above the resampled Nyquist order is
 * thus removed before it can fold into low orders, at every speed; a fixed
 * pre-filter would have to be set for the lowest speed and would discard
 * orders at high speed. Kernel: sinc times a Blackman window spanning 8
 * cutoff periods either side (common practice for band-limited
 * interpolation), normalised to unit gain at 0 Hz.
 *
 * @module
 */

/** Options of {@linkcode resampleToAngle}. */
export interface AngleResampleOptions {
  /** Samples per revolution. Required. */
  samplesPerRev: number;
  /** First angle, revolutions. Required. */
  startRev: number;
  /** Number of output samples. Required. */
  count: number;
  /** Zero crossings of the kernel either side. Default 8. */
  halfWidth?: number;
}

/**
 * The signal at equal angle steps of 1/samplesPerRev revolution.
 *
 * @param timeOfAngle inverse of the shaft angle: time in s at angle θ (revolutions)
 * @param rpmAtTime shaft speed at a time, rpm
 *
 * @example
 * ```ts
 * import { resampleToAngle } from "./angle_resample.ts";
 * // 1200 rpm (20 rev/s), sampled at 4 kHz; order 3 becomes 3 cycles per revolution.
 * const x = new Float64Array(8000).map((_, i) => Math.cos(2 * Math.PI * 3 * 20 * i / 4000));
 * const y = resampleToAngle(x, 4000, (rev) => rev / 20, () => 1200, { samplesPerRev: 32, startRev: 4, count: 64 });
 * if (Math.abs(y[0] - 1) > 1e-3 || Math.abs(y[16] + 1) > 1e-3) throw new Error(); // half a rev: cos(3π) = −1
 * ```
 */
export function resampleToAngle(
  signal: Float64Array,
  rate: number,
  timeOfAngle: (rev: number) => number,
  rpmAtTime: (time: number) => number,
  options: AngleResampleOptions,
): Float64Array {
  const { samplesPerRev, startRev, count } = options;
  const zeros = options.halfWidth ?? 8;
  const out = new Float64Array(count);
  for (let j = 0; j < count; j++) {
    const t = timeOfAngle(startRev + j / samplesPerRev);
    const outputRate = (rpmAtTime(t) / 60) * samplesPerRev;
    const cutoff = Math.min(0.45 * outputRate, 0.45 * rate);
    const reach = zeros / (2 * cutoff); // seconds either side
    const centre = t * rate;
    const first = Math.max(0, Math.ceil(centre - reach * rate));
    const last = Math.min(signal.length - 1, Math.floor(centre + reach * rate));
    let sum = 0;
    let weight = 0;
    for (let n = first; n <= last; n++) {
      const tau = (n - centre) / rate;
      const x = 2 * cutoff * tau;
      const sinc = x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x);
      const u = tau / reach; // −1 … 1
      const blackman = 0.42 + 0.5 * Math.cos(Math.PI * u) + 0.08 * Math.cos(2 * Math.PI * u);
      const h = sinc * blackman;
      sum += h * signal[n];
      weight += h;
    }
    out[j] = weight === 0 ? 0 : sum / weight;
  }
  return out;
}

/**
 * The inverse of a monotone angle function: the time at which the shaft
 * reaches `rev`, by bisection within `span`.
 *
 * @example
 * ```ts
 * import { inverseAngle } from "./angle_resample.ts";
 * const t = inverseAngle((time) => 10 * time, [0, 5])(12.5);
 * if (Math.abs(t - 1.25) > 1e-9) throw new Error();
 * ```
 */
export function inverseAngle(
  angleAt: (time: number) => number,
  span: readonly [number, number],
): (rev: number) => number {
  return (rev: number) => {
    let lo = span[0];
    let hi = span[1];
    for (let i = 0; i < 60; i++) {
      const mid = (lo + hi) / 2;
      if (angleAt(mid) < rev) lo = mid;
      else hi = mid;
    }
    return (lo + hi) / 2;
  };
}
