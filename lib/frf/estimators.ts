/**
 * FRF estimators and coherence from averaged auto and cross spectra, with
 * Gxy = E[X*·Y] as the spectral core forms it (Bendat & Piersol, Random
 * Data, 4th ed., ch. 9):
 *
 * - H1 = Gxy/Gxx: unbiased by noise on the output.
 * - H2 = Gyy/Gyx: unbiased by noise on the input.
 * - Hv: the total-least-squares estimator, the eigenvector of the smallest
 *   eigenvalue of [[Gxx, Gxy], [Gyx, Gyy]]. For one input it is
 *   Hv = (Gyy − Gxx + √((Gxx − Gyy)² + 4|Gxy|²)) / (2·Gyx). It is unbiased when
 *   input and output carry noise of equal power, and always lies between H1
 *   and H2 in magnitude, with the phase of both.
 * - Ordinary coherence γ² = |Gxy|²/(Gxx·Gyy).
 *
 * @module
 */
import { parseChoice } from "../choices.ts";

/**
 * The FRF estimators.
 *
 * @example
 * ```ts
 * import { ESTIMATORS } from "./estimators.ts";
 * if (ESTIMATORS.join() !== "h1,h2,hv") throw new Error();
 * ```
 */
export const ESTIMATORS = ["h1", "h2", "hv"] as const;

/** One of {@linkcode ESTIMATORS}. */
export type Estimator = typeof ESTIMATORS[number];

/**
 * Narrows a user-supplied string to an {@linkcode Estimator}.
 *
 * @example
 * ```ts
 * import { parseEstimator } from "./estimators.ts";
 * if (parseEstimator("hv") !== "hv") throw new Error();
 * ```
 */
export function parseEstimator(name: string): Estimator {
  return parseChoice(name, ESTIMATORS, "FRF estimator");
}

/** The spectra of one input/output pair, line by line. */
export interface PairSpectra {
  /** Input auto spectrum Gxx. */
  readonly gxx: Float64Array;
  /** Output auto spectrum Gyy. */
  readonly gyy: Float64Array;
  /** Real part of Gxy = E[X*·Y]. */
  readonly gxyRe: Float64Array;
  /** Imaginary part of Gxy. */
  readonly gxyIm: Float64Array;
}

/** A complex function of frequency. */
export interface ComplexSpectrum {
  /** Real part per line. */
  readonly re: Float64Array;
  /** Imaginary part per line. */
  readonly im: Float64Array;
}

/**
 * The FRF by the chosen estimator. Lines where the needed denominator is 0
 * (no excitation at all) come out as NaN, never as a made-up number.
 *
 * @example
 * ```ts
 * import { frfEstimate } from "./estimators.ts";
 * // Noise-free y = (2 + 1i)·x: all three estimators give 2 + 1i.
 * const s = { gxx: new Float64Array([4]), gyy: new Float64Array([20]),
 *   gxyRe: new Float64Array([8]), gxyIm: new Float64Array([4]) };
 * for (const e of ["h1", "h2", "hv"] as const) {
 *   const h = frfEstimate(s, e);
 *   if (Math.abs(h.re[0] - 2) > 1e-12 || Math.abs(h.im[0] - 1) > 1e-12) throw new Error(e);
 * }
 * ```
 */
export function frfEstimate(spectra: PairSpectra, estimator: Estimator): ComplexSpectrum {
  const { gxx, gyy, gxyRe, gxyIm } = spectra;
  const n = gxx.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const cross2 = gxyRe[k] * gxyRe[k] + gxyIm[k] * gxyIm[k];
    let gain: number; // H = gain·Gxy for every estimator
    if (estimator === "h1") {
      gain = 1 / gxx[k];
    } else if (estimator === "h2") {
      // Gyy/Gyx = Gyy/conj(Gxy) = Gyy·Gxy/|Gxy|²
      gain = gyy[k] / cross2;
    } else {
      const d = gxx[k] - gyy[k];
      gain = (gyy[k] - gxx[k] + Math.sqrt(d * d + 4 * cross2)) / (2 * cross2);
    }
    if (!Number.isFinite(gain)) gain = NaN;
    re[k] = gain * gxyRe[k];
    im[k] = gain * gxyIm[k];
  }
  return { re, im };
}

/**
 * Ordinary coherence γ² = |Gxy|²/(Gxx·Gyy), in [0, 1]; NaN where either
 * auto spectrum is 0.
 *
 * @example
 * ```ts
 * import { coherence } from "./estimators.ts";
 * const g = coherence({ gxx: new Float64Array([4]), gyy: new Float64Array([25]),
 *   gxyRe: new Float64Array([6]), gxyIm: new Float64Array([0]) });
 * if (Math.abs(g[0] - 0.36) > 1e-12) throw new Error();
 * ```
 */
export function coherence(spectra: PairSpectra): Float64Array {
  const { gxx, gyy, gxyRe, gxyIm } = spectra;
  return gxx.map((x, k) => {
    const value = (gxyRe[k] * gxyRe[k] + gxyIm[k] * gxyIm[k]) / (x * gyy[k]);
    return Number.isFinite(value) ? value : NaN;
  });
}

/**
 * Normalised random error of |H| for `averages` independent averages,
 * ε = √(1 − γ²) / (|γ|·√(2·n_d)) (Bendat & Piersol, Random Data, 4th ed.,
 * eq. 9.73). With one average γ² is identically 1 and ε says nothing.
 *
 * @throws {RangeError} when `averages` is not a positive integer.
 *
 * @example
 * ```ts
 * import { randomError } from "./estimators.ts";
 * const e = randomError(new Float64Array([0.5]), 50);
 * if (Math.abs(e[0] - 0.1) > 1e-12) throw new Error();
 * ```
 */
export function randomError(coherenceValues: Float64Array, averages: number): Float64Array {
  if (!Number.isInteger(averages) || averages < 1) {
    throw new RangeError(`averages must be a positive integer, got ${averages}`);
  }
  return coherenceValues.map((g2) => Math.sqrt(Math.max(0, 1 - g2)) / Math.sqrt(g2 * 2 * averages));
}
