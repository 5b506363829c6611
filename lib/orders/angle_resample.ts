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
  /** Sample rate of the signals, Hz. Required. */
  rate: number;
  /** Inverse of the shaft angle: time in s at angle θ (revolutions). Required. */
  timeOfAngle: (rev: number) => number;
  /** Shaft speed at a time, rpm. Required. */
  rpmAtTime: (time: number) => number;
  /** Samples per revolution. Required. */
  samplesPerRev: number;
  /** First angle, revolutions. Required. */
  startRev: number;
  /** Number of output samples. Required. */
  count: number;
  /** Zero crossings of the kernel either side. Default 8. */
  halfWidth?: number;
  /**
   * Index in the whole record of the signals' first sample, when they hold a
   * stretch of it. Default 0.
   */
  offset?: number;
  /** Samples in the whole record, for its ends. Default: the signals' length. */
  recordLength?: number;
}

/** Points of a kernel table over u ∈ [−1, 1]: linear interpolation errs by under 1e-6. */
const TABLE_POINTS = 1 << 14;
const kernels = new Map<number, Float64Array>();

/**
 * The kernel sinc(zeros·u)·Blackman(u) tabulated over u ∈ [−1, 1] (u is the
 * distance from the output instant in units of the kernel's reach), made
 * once per kernel width and shared by every channel and call.
 */
function kernelTable(zeros: number): Float64Array {
  let table = kernels.get(zeros);
  if (table === undefined) {
    table = new Float64Array(TABLE_POINTS + 2);
    for (let i = 0; i <= TABLE_POINTS; i++) {
      const u = -1 + (2 * i) / TABLE_POINTS;
      const x = zeros * u;
      const sinc = x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x);
      table[i] = sinc * (0.42 + 0.5 * Math.cos(Math.PI * u) + 0.08 * Math.cos(2 * Math.PI * u));
    }
    table[TABLE_POINTS + 1] = table[TABLE_POINTS];
    kernels.set(zeros, table);
  }
  return table;
}

/**
 * The signals at equal angle steps of 1/samplesPerRev revolution. The kernel
 * weights of each output instant are computed once for all signals.
 *
 * @example
 * ```ts
 * import { resampleToAngle } from "./angle_resample.ts";
 * // 1200 rpm (20 rev/s), sampled at 4 kHz; order 3 becomes 3 cycles per revolution.
 * const x = new Float64Array(8000).map((_, i) => Math.cos(2 * Math.PI * 3 * 20 * i / 4000));
 * const [y] = resampleToAngle([x], { rate: 4000, timeOfAngle: (rev) => rev / 20, rpmAtTime: () => 1200, samplesPerRev: 32, startRev: 4, count: 64 });
 * // At angle 4 + j/32 the order-3 cosine is cos(2π·3·j/32).
 * if (Math.abs(y[5] - Math.cos(2 * Math.PI * 3 * 5 / 32)) > 1e-3) throw new Error();
 * ```
 */
export function resampleToAngle(
  signals: readonly Float64Array[],
  options: AngleResampleOptions,
): Float64Array[] {
  const { rate, timeOfAngle, rpmAtTime, samplesPerRev, startRev, count } = options;
  const zeros = options.halfWidth ?? 8;
  const table = kernelTable(zeros);
  const offset = options.offset ?? 0;
  const held = signals[0]?.length ?? 0;
  const length = options.recordLength ?? held;
  const outs = signals.map(() => new Float64Array(count));
  const sums = new Float64Array(signals.length);
  for (let j = 0; j < count; j++) {
    const t = timeOfAngle(startRev + j / samplesPerRev);
    const outputRate = (rpmAtTime(t) / 60) * samplesPerRev;
    const cutoff = Math.min(0.45 * outputRate, 0.45 * rate);
    const reach = zeros / (2 * cutoff); // seconds either side
    const centre = t * rate;
    const first = Math.max(0, Math.ceil(centre - reach * rate));
    const last = Math.min(length - 1, Math.floor(centre + reach * rate));
    if (first < offset || last >= offset + held) {
      // The caller's stretch must hold every tap; reading past it would be a bug of ours.
      throw new Error(
        `the stretch ${offset}–${
          offset + held - 1
        } lacks samples ${first}–${last} for the resampler`,
      );
    }
    const step = TABLE_POINTS / (2 * reach * rate); // table points per input sample
    sums.fill(0);
    let weight = 0;
    for (let n = first; n <= last; n++) {
      const at = (n - centre + reach * rate) * step; // 0 … TABLE_POINTS
      const i = Math.floor(at);
      const h = table[i] + (at - i) * (table[i + 1] - table[i]);
      for (let c = 0; c < signals.length; c++) sums[c] += h * signals[c][n - offset];
      weight += h;
    }
    for (let c = 0; c < signals.length; c++) outs[c][j] = weight === 0 ? 0 : sums[c] / weight;
  }
  return outs;
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
