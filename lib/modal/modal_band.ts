/**
 * The band of a modal fit: its lines, the model orders it supports, and its
 * FRFs as receptance (mobility divided by jω, accelerance by (jω)²).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { FrfChannel } from "../frf/frf_data.ts";
import { SELECTION_RULE } from "./selection_rule.ts";

/**
 * The highest model order a band of `lines` lines supports: LSCF of order n
 * needs more than n + 1 lines, and above 128 (ours) the fit takes long and
 * the z-domain polynomial is ill-conditioned; even.
 *
 * @example
 * ```ts
 * import { largestModelOrder } from "./modal_band.ts";
 * if (largestModelOrder(41) !== 38 || largestModelOrder(4000) !== 128) throw new Error();
 * ```
 */
export function largestModelOrder(lines: number): number {
  const byLines = lines - 2 - ((lines - 2) % 2);
  return Math.min(byLines, SELECTION_RULE.orderLimit);
}

/**
 * The lowest highest-order with which the automatic rule can find a mode:
 * orders run 2, 4, …, and a pole of order 2 has no order before it to be
 * stable against, so orders 4 … N hold N/2 − 1 stable poles at most; a
 * mode needs `stableOrders` of them (default 5, hence 12).
 *
 * @example
 * ```ts
 * import { smallestAutomaticOrder } from "./modal_band.ts";
 * if (smallestAutomaticOrder() !== 12 || smallestAutomaticOrder(3) !== 8) throw new Error();
 * ```
 */
export function smallestAutomaticOrder(stableOrders = 5): number {
  // Orders 4, 6, …, N can each hold one stable pole: N/2 − 1 ≥ stableOrders.
  return 2 * stableOrders + 2;
}

/**
 * The fewest band lines a fit of order `order` needs (the inverse of
 * {@linkcode largestModelOrder}: more than order + 1 lines).
 *
 * @example
 * ```ts
 * import { largestModelOrder, linesForOrder } from "./modal_band.ts";
 * if (linesForOrder(12) !== 14 || largestModelOrder(linesForOrder(12)) !== 12) throw new Error();
 * ```
 */
export function linesForOrder(order: number): number {
  return order + 2;
}

/**
 * The lines [from, to) of an FRF as receptance; `assumed` when the FRF does
 * not state its form (read as receptance).
 *
 * @throws {QuiverError} for an FRF without phase.
 *
 * @example
 * ```ts
 * import { asReceptance } from "./modal_band.ts";
 * // Mobility 1 + 0j at ω = 1 rad/s is receptance (1 + 0j)/(j·1) = 0 − 1j.
 * const f = new Float64Array([1 / (2 * Math.PI)]);
 * const r = asReceptance({ name: "v", unit: "(m/s)/N", form: "mobility", re: new Float64Array([1]), im: new Float64Array([0]), magnitude: new Float64Array([1]) }, f, 0, 1);
 * if (Math.abs(r.re[0]) > 1e-12 || Math.abs(r.im[0] + 1) > 1e-12 || r.assumed) throw new Error();
 * ```
 */
export function asReceptance(
  frf: FrfChannel,
  frequencies: Float64Array,
  from: number,
  to: number,
): { re: Float64Array; im: Float64Array; assumed: boolean } {
  if (frf.re === undefined || frf.im === undefined) {
    throw new QuiverError(`FRF "${frf.name}" has no phase: a modal fit needs complex FRFs`);
  }
  const power = frf.form === "accelerance" ? 2 : frf.form === "mobility" ? 1 : 0;
  const re = new Float64Array(to - from), im = new Float64Array(to - from);
  for (let k = from; k < to; k++) {
    const w = 2 * Math.PI * frequencies[k];
    let r = frf.re[k], i = frf.im[k];
    // Divide by jω once per power: (r + ji)/(jω) = (i − jr)/ω.
    for (let p = 0; p < power; p++) [r, i] = [i / w, -r / w];
    re[k - from] = r;
    im[k - from] = i;
  }
  return { re, im, assumed: frf.form === undefined };
}

/**
 * The band [from, to) of line indices: lines above 0 Hz within [minHz, maxHz].
 *
 * @example
 * ```ts
 * import { modalBand } from "./modal_band.ts";
 * const b = modalBand(new Float64Array([0, 10, 20, 30, 40]), { minHz: 15, maxHz: 30 });
 * if (b.from !== 2 || b.to !== 4) throw new Error();
 * ```
 */
export function modalBand(
  frequencies: Float64Array,
  options: { minHz?: number; maxHz?: number } = {},
): { from: number; to: number } {
  const lo = options.minHz ?? 0;
  const hi = options.maxHz ?? Infinity;
  let from = 0;
  while (from < frequencies.length && !(frequencies[from] > 0 && frequencies[from] >= lo)) from++;
  let to = frequencies.length;
  while (to > from && frequencies[to - 1] > hi) to--;
  return { from, to };
}
