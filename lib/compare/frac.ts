/**
 * The frequency response assurance criterion (FRAC; Heylen & Lammens 1996,
 * common practice in test/analysis correlation):
 *
 *   FRAC = |Σ Hₜ*·Hₛ|² / (Σ|Hₜ|² · Σ|Hₛ|²)
 *
 * on complex data when both curves have phase, else on magnitudes
 * (Σ|Hₜ||Hₛ|)²/(Σ|Hₜ|²·Σ|Hₛ|²). 1 for curves of the same shape, 0 for
 * orthogonal ones; insensitive to a common scale factor.
 *
 * @module
 */
import type { Curve } from "./curve_input.ts";

/**
 * FRAC of two curves on the same grid.
 *
 * @throws {RangeError} when the curves differ in length.
 *
 * @example
 * ```ts
 * import { frac } from "./frac.ts";
 * const c = (re: number[], im: number[]) => ({ frequencies: new Float64Array(re.length), magnitude: new Float64Array(re.length),
 *   re: new Float64Array(re), im: new Float64Array(im), quantity: "amplitude" as const, unit: "", column: "" });
 * if (Math.abs(frac(c([1, 0], [0, 0]), c([0, 1], [0, 0])).value) > 1e-15) throw new Error();
 * ```
 */
export function frac(test: Curve, simulation: Curve): { value: number; complex: boolean } {
  const n = test.magnitude.length;
  // The curves come from the alignment, never from the user: a mismatch is a bug of ours.
  if (simulation.magnitude.length !== n) throw new Error("FRAC needs both curves on one grid");
  const complex = test.re !== undefined && test.im !== undefined && simulation.re !== undefined &&
    simulation.im !== undefined;
  let crossRe = 0, crossIm = 0, tt = 0, ss = 0;
  for (let k = 0; k < n; k++) {
    if (complex) {
      const a = test.re![k], b = test.im![k], c = simulation.re![k], d = simulation.im![k];
      crossRe += a * c + b * d; // conj(Ht)·Hs
      crossIm += a * d - b * c;
      tt += a * a + b * b;
      ss += c * c + d * d;
    } else {
      crossRe += test.magnitude[k] * simulation.magnitude[k];
      tt += test.magnitude[k] ** 2;
      ss += simulation.magnitude[k] ** 2;
    }
  }
  return { value: (crossRe * crossRe + crossIm * crossIm) / (tt * ss), complex };
}
