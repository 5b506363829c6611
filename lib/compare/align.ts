/**
 * Putting two curves on one frequency grid.
 *
 * The common grid is the coarser of the two grids (the one with the larger
 * median line spacing), restricted to the range both cover (and to the
 * requested range). The other curve is interpolated linearly onto it: in
 * real and imaginary parts when it has phase, else in magnitude. Linear
 * interpolation between lines of the finer grid is accurate because that
 * grid is finer.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Curve } from "./curve_input.ts";
import { formatNumber } from "../format_number.ts";

/** Two curves on one grid. */
export interface AlignedCurves {
  /** The common grid, Hz. */
  readonly frequencies: Float64Array;
  /** The test curve on it. */
  readonly test: Curve;
  /** The simulation curve on it. */
  readonly simulation: Curve;
  /** Which grid was kept: "test" or "simulation". */
  readonly gridFrom: "test" | "simulation";
}

function medianSpacing(f: Float64Array): number {
  const d = f.slice(1).map((v, i) => v - f[i]).sort();
  return d[Math.floor(d.length / 2)];
}

function interpolate(x: Float64Array, y: Float64Array, at: Float64Array): Float64Array {
  let j = 0;
  return at.map((t) => {
    while (j < x.length - 2 && x[j + 1] < t) j++;
    const u = (t - x[j]) / (x[j + 1] - x[j]);
    return y[j] + u * (y[j + 1] - y[j]);
  });
}

function resample(curve: Curve, at: Float64Array): Curve {
  const { frequencies: x } = curve;
  if (curve.re !== undefined && curve.im !== undefined) {
    const re = interpolate(x, curve.re, at);
    const im = interpolate(x, curve.im, at);
    return { ...curve, frequencies: at, re, im, magnitude: re.map((r, k) => Math.hypot(r, im[k])) };
  }
  return { ...curve, frequencies: at, magnitude: interpolate(x, curve.magnitude, at) };
}

/**
 * Aligns `test` and `simulation` on the coarser grid over their overlap.
 *
 * @throws {QuiverError} when the curves share fewer than 3 lines.
 *
 * @example
 * ```ts
 * import { alignCurves } from "./align.ts";
 * const c = (f: number[], m: number[]) => ({ frequencies: new Float64Array(f), magnitude: new Float64Array(m), quantity: "amplitude" as const, unit: "", column: "x" });
 * const a = alignCurves(c([0, 1, 2, 3, 4, 5, 6], [0, 1, 2, 3, 4, 5, 6]), c([1, 3, 5, 7], [5, 5, 5, 5]));
 * if (a.frequencies.join() !== "1,3,5" || a.test.magnitude.join() !== "1,3,5") throw new Error();
 * ```
 */
export function alignCurves(
  test: Curve,
  simulation: Curve,
  minHz = -Infinity,
  maxHz = Infinity,
): AlignedCurves {
  const low = Math.max(test.frequencies[0], simulation.frequencies[0], minHz);
  const high = Math.min(
    test.frequencies[test.frequencies.length - 1],
    simulation.frequencies[simulation.frequencies.length - 1],
    maxHz,
  );
  const gridFrom = medianSpacing(test.frequencies) >= medianSpacing(simulation.frequencies)
    ? "test"
    : "simulation";
  const source = gridFrom === "test" ? test : simulation;
  const frequencies = source.frequencies.filter((f) => f >= low && f <= high);
  if (frequencies.length < 3) {
    throw new QuiverError(
      `the two curves share only ${frequencies.length} line(s) between ${
        formatNumber(low, 6)
      } and ${formatNumber(high, 6)} Hz`,
    );
  }
  return {
    frequencies,
    test: resample(test, frequencies),
    simulation: resample(simulation, frequencies),
    gridFrom,
  };
}
