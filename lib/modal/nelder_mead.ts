/**
 * The Nelder–Mead simplex minimiser (Nelder & Mead 1965, "A simplex method
 * for function minimization"), with the usual coefficients: reflection 1,
 * expansion 2, contraction ½, shrink ½. Small and derivative-free: enough
 * for the two nonlinear parameters of a single-mode fit.
 *
 * @module
 */
import { indexOfMin } from "../extent.ts";

/** Options of {@linkcode minimise}. */
export interface MinimiseOptions {
  /** Initial step per parameter. Default: 5 % of each start value, or 0.05 for zeros. */
  step?: readonly number[];
  /** Stop when the simplex's function values span less than this. Default 1e-14 (relative). */
  tolerance?: number;
  /** Largest number of iterations. Default 2000. */
  maxIterations?: number;
}

/** The minimum found. */
export interface Minimum {
  /** Parameters at the minimum. */
  readonly x: number[];
  /** Function value there. */
  readonly value: number;
  /** Iterations used. */
  readonly iterations: number;
}

/**
 * Minimises `f` from `start`.
 *
 * @example
 * ```ts
 * import { minimise } from "./nelder_mead.ts";
 * const m = minimise(([a, b]) => (a - 1) ** 2 + 10 * (b + 2) ** 2, [0, 0]);
 * if (Math.abs(m.x[0] - 1) > 1e-5 || Math.abs(m.x[1] + 2) > 1e-5) throw new Error();
 * ```
 */
export function minimise(
  f: (x: number[]) => number,
  start: readonly number[],
  options: MinimiseOptions = {},
): Minimum {
  const n = start.length;
  const tolerance = options.tolerance ?? 1e-14;
  const maxIterations = options.maxIterations ?? 2000;
  const simplex: number[][] = [start.slice()];
  for (let i = 0; i < n; i++) {
    const point = start.slice();
    point[i] += options.step?.[i] ?? (start[i] === 0 ? 0.05 : 0.05 * start[i]);
    simplex.push(point);
  }
  let values = simplex.map(f);
  let iterations = 0;
  for (; iterations < maxIterations; iterations++) {
    const order = values.map((_, i) => i).sort((a, b) => values[a] - values[b]);
    const sorted = order.map((i) => simplex[i]);
    values = order.map((i) => values[i]);
    simplex.splice(0, simplex.length, ...sorted);
    const spread = Math.abs(values[n] - values[0]);
    if (spread <= tolerance * (Math.abs(values[0]) + tolerance)) break;
    const centroid = new Array(n).fill(0);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) centroid[j] += simplex[i][j] / n;
    const along = (t: number) => centroid.map((c, j) => c + t * (simplex[n][j] - c));
    const reflected = along(-1);
    const fr = f(reflected);
    if (fr < values[0]) {
      const expanded = along(-2);
      const fe = f(expanded);
      [simplex[n], values[n]] = fe < fr ? [expanded, fe] : [reflected, fr];
    } else if (fr < values[n - 1]) {
      [simplex[n], values[n]] = [reflected, fr];
    } else {
      const contracted = fr < values[n] ? along(-0.5) : along(0.5);
      const fc = f(contracted);
      if (fc < Math.min(fr, values[n])) {
        [simplex[n], values[n]] = [contracted, fc];
      } else {
        for (let i = 1; i <= n; i++) {
          simplex[i] = simplex[i].map((v, j) => simplex[0][j] + 0.5 * (v - simplex[0][j]));
          values[i] = f(simplex[i]);
        }
      }
    }
  }
  const best = indexOfMin(values);
  return { x: simplex[best], value: values[best], iterations };
}
