/**
 * How sure a change between two spectral estimates is, from each
 * estimate's own averaging (Bendat & Piersol, "Random Data", 4th ed.,
 * ch. 8 and 9):
 *
 * - An averaged autospectrum Ĝ with ν degrees of freedom is G·χ²_ν/ν
 *   (ν = 2n for n independent averages). The ratio of two independent
 *   estimates of the same G, Ĝ_c/Ĝ_b, then follows F(ν_c, ν_b), and
 *   [R/F_{1−α/2}(ν_c, ν_b), R/F_{α/2}(ν_c, ν_b)] is the interval of the
 *   true ratio at confidence 1 − α.
 * - Overlapped segments are not independent: Welch's (1967) equivalent
 *   degrees of freedom ν = 2K / (1 + 2 Σ_{m=1}^{K−1} (1 − m/K) ρ²(m)), with
 *   ρ(m) = Σ w(i) w(i + mS) / Σ w(i)² the window's correlation at m shifts
 *   of S samples (Hann at 50 %: ρ(1)² ≈ 0.028, so 15 averages count as 28.5
 *   degrees of freedom instead of 30).
 * - An FRF magnitude |Ĥ| has the normalized random error
 *   ε = sqrt(1 − γ²) / (|γ| sqrt(2 n)) (B&P eq. 9.73, γ² the coherence), and
 *   ln|Ĥ| is close to normal with standard deviation ε for small ε; the
 *   difference of two independent log magnitudes has sqrt(ε_b² + ε_c²).
 *
 * @module
 */
import { fQuantile, normalQuantile } from "./confidence_distributions.ts";

/** A change with its interval at some confidence, in dB. */
export interface ChangeInterval {
  /** The change, dB (candidate against baseline). */
  readonly differenceDb: number;
  /** The interval's lower bound, dB. */
  readonly lowerDb: number;
  /** The interval's upper bound, dB. */
  readonly upperDb: number;
  /** Whether the interval leaves out 0 dB: more change than random error explains. */
  readonly significant: boolean;
}

/**
 * Welch's equivalent degrees of freedom of a linear average of `averages`
 * segments of the window `window`, consecutive segments `shift` samples
 * apart: 2K without overlap, fewer with it.
 *
 * @throws {RangeError} for averages < 1 or shift < 1.
 *
 * @example
 * ```ts
 * import { equivalentDegreesOfFreedom } from "./confidence_intervals.ts";
 * const hann = Float64Array.from({ length: 1024 }, (_, i) => Math.sin(Math.PI * i / 1024) ** 2);
 * if (equivalentDegreesOfFreedom(hann, 1024, 15) !== 30) throw new Error(); // no overlap: 2n
 * const nu = equivalentDegreesOfFreedom(hann, 512, 15); // Hann, 50 %
 * if (Math.abs(nu - 30 / (1 + 2 * (14 / 15) / 36)) > 1e-6) throw new Error(); // ρ(1) = 1/6
 * ```
 */
export function equivalentDegreesOfFreedom(
  window: Float64Array,
  shift: number,
  averages: number,
): number {
  if (!(averages >= 1) || !Number.isInteger(averages)) {
    throw new RangeError(`averages must be a whole number ≥ 1, got ${averages}`);
  }
  if (!(shift >= 1) || !Number.isInteger(shift)) {
    throw new RangeError(`the shift must be a whole number of samples ≥ 1, got ${shift}`);
  }
  let energy = 0;
  for (let i = 0; i < window.length; i++) energy += window[i] * window[i];
  let sum = 0;
  for (let m = 1; m < averages && m * shift < window.length; m++) {
    let lagged = 0;
    for (let i = 0; i + m * shift < window.length; i++) lagged += window[i] * window[i + m * shift];
    const rho = lagged / energy;
    sum += (1 - m / averages) * rho * rho;
  }
  return (2 * averages) / (1 + 2 * sum);
}

/** F quantiles by (p, ν1, ν2): one bisection per pair, however many lines share it. */
const quantiles = new Map<string, number>();

function cachedF(p: number, d1: number, d2: number): number {
  const key = `${p}|${d1}|${d2}`;
  let q = quantiles.get(key);
  if (q === undefined) {
    q = fQuantile(p, d1, d2);
    if (quantiles.size > 100_000) quantiles.clear();
    quantiles.set(key, q);
  }
  return q;
}

function checkConfidence(confidence: number): void {
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`the confidence must lie between 0 and 1, got ${confidence}`);
  }
}

/**
 * The change between two averaged power estimates (autospectra, band
 * powers) given as `ratio` = candidate / baseline, with ν_b and ν_c
 * degrees of freedom, and its interval at `confidence` from F(ν_c, ν_b).
 *
 * @throws {RangeError} for a confidence outside (0, 1) or degrees of freedom ≤ 0.
 *
 * @example
 * ```ts
 * import { powerRatioInterval } from "./confidence_intervals.ts";
 * // F(2, 2): quantile p/(1 − p), so at 95 % the bounds are ratio/39 and ratio·39.
 * const c = powerRatioInterval(1, 2, 2, 0.95);
 * if (Math.abs(c.upperDb - 10 * Math.log10(39)) > 1e-9 || c.significant) throw new Error();
 * ```
 */
export function powerRatioInterval(
  ratio: number,
  baselineDof: number,
  candidateDof: number,
  confidence: number,
): ChangeInterval {
  checkConfidence(confidence);
  const alpha = 1 - confidence;
  const differenceDb = 10 * Math.log10(ratio);
  const lowerDb = differenceDb - 10 * Math.log10(cachedF(1 - alpha / 2, candidateDof, baselineDof));
  const upperDb = differenceDb - 10 * Math.log10(cachedF(alpha / 2, candidateDof, baselineDof));
  return { differenceDb, lowerDb, upperDb, significant: lowerDb > 0 || upperDb < 0 };
}

/**
 * The normalized random error of an FRF magnitude from its coherence γ²
 * and `averages` independent averages: sqrt(1 − γ²)/(|γ| sqrt(2n))
 * (Bendat & Piersol, Random Data, eq. 9.73).
 *
 * @example
 * ```ts
 * import { frfRandomError } from "./confidence_intervals.ts";
 * // γ² = 0.5, n = 8: sqrt(0.5)/(sqrt(0.5)·4) = 0.25.
 * if (Math.abs(frfRandomError(0.5, 8) - 0.25) > 1e-15) throw new Error();
 * ```
 */
export function frfRandomError(coherence: number, averages: number): number {
  return Math.sqrt(Math.max(0, 1 - coherence)) / (Math.sqrt(coherence) * Math.sqrt(2 * averages));
}

/**
 * The change of an FRF magnitude, 20·lg(|H_c|/|H_b|), and its interval at
 * `confidence` from the normal approximation on ln|H| with each
 * magnitude's normalized random error.
 *
 * @throws {RangeError} for a confidence outside (0, 1).
 *
 * @example
 * ```ts
 * import { frfChangeInterval } from "./confidence_intervals.ts";
 * const c = frfChangeInterval(1, 2, 0.01, 0.01, 0.95);
 * if (Math.abs(c.differenceDb - 20 * Math.log10(2)) > 1e-12 || !c.significant) throw new Error();
 * ```
 */
export function frfChangeInterval(
  baselineMagnitude: number,
  candidateMagnitude: number,
  baselineError: number,
  candidateError: number,
  confidence: number,
): ChangeInterval {
  checkConfidence(confidence);
  const z = cachedNormal(1 - (1 - confidence) / 2);
  const differenceDb = 20 * Math.log10(candidateMagnitude / baselineMagnitude);
  // ln|H| to dB: 20/ln 10 per neper.
  const halfWidth = z * (20 / Math.LN10) * Math.hypot(baselineError, candidateError);
  const lowerDb = differenceDb - halfWidth, upperDb = differenceDb + halfWidth;
  return { differenceDb, lowerDb, upperDb, significant: lowerDb > 0 || upperDb < 0 };
}

const normals = new Map<number, number>();

function cachedNormal(p: number): number {
  let z = normals.get(p);
  if (z === undefined) {
    z = normalQuantile(p);
    normals.set(p, z);
  }
  return z;
}
