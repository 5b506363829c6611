/**
 * Half-power bandwidth damping, ζ = (f₂ − f₁)/(2·fₙ) (Ewins, Modal Testing,
 * 2nd ed., sec. 4.3).
 *
 * The magnitude peak is not at fₙ for every FRF form: a single mode's
 * mobility peaks at fₙ, its receptance at fₙ√(1 − 2ζ²) and its accelerance at
 * fₙ/√(1 − 2ζ²) (analytic, from |H|'s maximum). fₙ is taken from the peak
 * accordingly, with ζ and fₙ solved together.
 *
 * Reading the peak and the −3 dB points off the nearest lines is off by
 * several percent when a mode falls between lines. Here both are
 * interpolated on 1/|H|², which near a single mode is close to a parabola
 * in frequency (for receptance exactly a quadratic in ω²): the peak is the
 * vertex of the parabola through the three lines around the maximum, and
 * each half-power frequency solves the parabola through the three lines
 * around its crossing.
 *
 * A mode whose interpolated peak stands more than 3 dB above its highest
 * line has its whole half-power band between two lines: there is no
 * estimate (undefined).
 *
 * The damping still carries the method's own bias, which grows with damping
 * and depends on the FRF form; for receptance the exact half-power points
 * are ω₁,₂² = ωₙ²(1 − 2ζ² ∓ 2ζ√(1−ζ²)), so (ω₂ − ω₁)/(2ωₙ) reads high.
 *
 * @module
 */

/** A half-power estimate of one mode. */
export interface HalfPowerEstimate {
  /** Natural frequency fₙ from the interpolated peak, Hz. */
  readonly frequencyHz: number;
  /** Interpolated peak frequency, Hz. */
  readonly peakHz: number;
  /** Interpolated peak magnitude. */
  readonly peakMagnitude: number;
  /** Lower half-power frequency f₁, Hz. */
  readonly lowerHz: number;
  /** Upper half-power frequency f₂, Hz. */
  readonly upperHz: number;
  /** ζ = (f₂ − f₁)/(2fₙ). */
  readonly dampingRatio: number;
  /** Lines inside [f₁, f₂] (bandwidth over line spacing at the peak). */
  readonly linesInBand: number;
}

/** Parabola through three points, as y(x) = a·x² + b·x + c. */
function parabola(x: readonly number[], y: readonly number[]): [number, number, number] {
  const [x0, x1, x2] = x;
  const [y0, y1, y2] = y;
  const d = (x0 - x1) * (x0 - x2) * (x1 - x2);
  const a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / d;
  const b = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / d;
  const c = y0 - a * x0 * x0 - b * x0;
  return [a, b, c];
}

/**
 * The interpolated peak around line `k`: the vertex of the parabola through
 * 1/|H|² at lines k − 1, k, k + 1 (falls back to line k when the three do not
 * curve upward).
 *
 * @example
 * ```ts
 * import { peakVertex } from "./half_power.ts";
 * const f = new Float64Array([9, 10, 11]);
 * const mag = f.map((v) => 1 / Math.sqrt(1 + (v - 10.3) ** 2));
 * if (Math.abs(peakVertex(f, mag, 1).frequencyHz - 10.3) > 1e-9) throw new Error();
 * ```
 */
export function peakVertex(
  frequencies: Float64Array,
  magnitude: Float64Array,
  k: number,
): { frequencyHz: number; magnitude: number } {
  if (k <= 0 || k >= magnitude.length - 1) {
    return { frequencyHz: frequencies[k], magnitude: magnitude[k] };
  }
  const inv = (i: number) => 1 / (magnitude[i] * magnitude[i]);
  const [a, b, c] = parabola(
    [frequencies[k - 1], frequencies[k], frequencies[k + 1]],
    [inv(k - 1), inv(k), inv(k + 1)],
  );
  if (!(a > 0)) return { frequencyHz: frequencies[k], magnitude: magnitude[k] };
  return { frequencyHz: -b / (2 * a), magnitude: 1 / Math.sqrt(c - (b * b) / (4 * a)) };
}

/**
 * The half-power estimate of the mode whose magnitude peaks on line
 * `peakIndex`, or undefined when a −3 dB point is not reached inside
 * `[lowLimit, highLimit]` (line indices, default the whole spectrum).
 * `power` is the FRF form's power of iω: 0 receptance, 1 mobility (the
 * default), 2 accelerance.
 *
 * @example
 * ```ts
 * import { halfPower } from "./half_power.ts";
 * // Mobility of one mode, whose half-power points are exact: ζ = 0.02 at 50 Hz.
 * const f = new Float64Array(2001).map((_, k) => 40 + k * 0.01);
 * const mag = f.map((v) => { const r = v / 50; return r / Math.hypot(1 - r * r, 2 * 0.02 * r); });
 * const hp = halfPower(f, mag, mag.indexOf(Math.max(...mag)))!;
 * if (Math.abs(hp.dampingRatio / 0.02 - 1) > 1e-4) throw new Error();
 * ```
 */
export function halfPower(
  frequencies: Float64Array,
  magnitude: Float64Array,
  peakIndex: number,
  options: {
    /** Lowest line the search may reach. Default 0. */
    lowLimit?: number;
    /** Highest line the search may reach. Default the last. */
    highLimit?: number;
    /** The FRF form's power of jω (0 receptance, 1 mobility, 2 accelerance). Default 1. */
    power?: number;
  } = {},
): HalfPowerEstimate | undefined {
  const lowLimit = options.lowLimit ?? 0;
  const highLimit = options.highLimit ?? magnitude.length - 1;
  const power = options.power ?? 1;
  const k = peakIndex;
  if (k <= lowLimit || k >= highLimit) return undefined;
  const inv = (i: number) => 1 / (magnitude[i] * magnitude[i]);
  const peak = peakVertex(frequencies, magnitude, k);
  const peakHz = peak.frequencyHz;
  const vertex = 1 / (peak.magnitude * peak.magnitude);
  const target = 2 * vertex;
  // The interpolated peak more than 3 dB above its own line: the whole half-power band lies
  // between two lines and cannot be read from them (before, the crossings came out with
  // f₁ > f₂ and a negative ζ).
  if (inv(k) >= target) return undefined;
  const crossing = (direction: -1 | 1): number | undefined => {
    let j = k;
    while (j + direction >= lowLimit && j + direction <= highLimit && inv(j) < target) {
      j += direction;
    }
    if (inv(j) < target) return undefined;
    // Three lines around the crossing, inside the allowed range.
    const mid = Math.min(Math.max(j - direction, lowLimit + 1), highLimit - 1);
    const xs = [frequencies[mid - 1], frequencies[mid], frequencies[mid + 1]];
    const [pa, pb, pc] = parabola(xs, [inv(mid - 1), inv(mid), inv(mid + 1)]);
    const inner = frequencies[j - direction];
    const outer = frequencies[j];
    const disc = pb * pb - 4 * pa * (pc - target);
    if (Math.abs(pa) > 1e-300 && disc >= 0) {
      for (const root of [(-pb - Math.sqrt(disc)) / (2 * pa), (-pb + Math.sqrt(disc)) / (2 * pa)]) {
        if (root >= Math.min(inner, outer) && root <= Math.max(inner, outer)) return root;
      }
    }
    // Fall back to linear interpolation between the two bracketing lines.
    const yi = inv(j - direction);
    return inner + ((target - yi) / (inv(j) - yi)) * (outer - inner);
  };
  const lowerHz = crossing(-1);
  const upperHz = crossing(1);
  if (lowerHz === undefined || upperHz === undefined) return undefined;
  const df = (frequencies[k + 1] - frequencies[k - 1]) / 2;
  // fₙ = f_peak·(1 − 2ζ²)^((p − 1)/2); a few fixed-point steps settle ζ and fₙ.
  let frequencyHz = peakHz;
  for (let step = 0; step < 5; step++) {
    const zeta = (upperHz - lowerHz) / (2 * frequencyHz);
    const shrink = 1 - 2 * zeta * zeta;
    frequencyHz = shrink > 0 ? peakHz * shrink ** ((power - 1) / 2) : peakHz;
  }
  return {
    frequencyHz,
    peakHz,
    peakMagnitude: 1 / Math.sqrt(vertex),
    lowerHz,
    upperHz,
    dampingRatio: (upperHz - lowerHz) / (2 * frequencyHz),
    linesInBand: (upperHz - lowerHz) / df,
  };
}
