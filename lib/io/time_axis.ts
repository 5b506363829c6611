/**
 * The sample rate a time column stands for.
 *
 * A time column printed with d decimals is rounded: each end point is off
 * by up to half a unit of the last decimal, so the span from first to last
 * sample is known to ±10^−d s, and (rows − 1)/span reads, say,
 * 4095.99998 Hz for a 4096 Hz recording. quiver takes the **nominal rate**
 * the column came from: the first of the rate rounded to a whole Hz, to
 * 0.1 Hz, 0.01 Hz and 0.001 Hz whose exact span (rows − 1)/rate lies within
 * that rounding of the column's span. When none does (or the column uses
 * exponents, so its rounding is unknown), the measured (rows − 1)/span is
 * the rate.
 *
 * @module
 */

/**
 * The nominal rate of a time column with `rows` samples spanning `span`
 * seconds from first to last, written with `decimals` decimals (Infinity
 * when not known).
 *
 * @example
 * ```ts
 * import { nominalRate } from "./time_axis.ts";
 * // 4096 Hz, 8192 rows, times printed with 6 decimals: the last reads 1.999756 s.
 * if (nominalRate(8192, 1.999756, 6) !== 4096) throw new Error();
 * // Exact times are taken as they are.
 * if (nominalRate(11, 1.0004, Infinity) !== 10 / 1.0004) throw new Error();
 * ```
 */
export function nominalRate(rows: number, span: number, decimals: number): number {
  const measured = (rows - 1) / span;
  if (!Number.isFinite(decimals) || rows < 2) return measured;
  const rounding = 10 ** -decimals * (1 + 1e-9);
  for (let digits = 0; digits <= 3; digits++) {
    const scale = 10 ** digits;
    const candidate = Math.round(measured * scale) / scale;
    if (candidate > 0 && Math.abs((rows - 1) / candidate - span) <= rounding) return candidate;
  }
  return measured;
}
