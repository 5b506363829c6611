/**
 * Numbers as people read them, in messages, titles, tables and metadata
 * notes: a stated number of significant figures or decimals, without float
 * noise (`0.49999999765623093` reads `0.5`), and a visible mark for a value
 * that is missing or not finite instead of a crash or a silent `0`.
 * Result files keep full precision; this is for text.
 *
 * @module
 */

/** What a missing or non-finite value prints as. */
export const NOT_A_VALUE = "n/a";

/**
 * `value` to `significant` significant figures, trailing zeros dropped;
 * {@linkcode NOT_A_VALUE} for null, undefined, NaN; `−∞`/`+∞` for infinities.
 *
 * @example
 * ```ts
 * import { formatNumber } from "./format_number.ts";
 * if (formatNumber(0.49999999765623093) !== "0.5") throw new Error();
 * if (formatNumber(4095.99998) !== "4096") throw new Error();
 * if (formatNumber(null) !== "n/a" || formatNumber(-Infinity) !== "−∞") throw new Error();
 * if (formatNumber(123456, 3) !== "123456") throw new Error(); // integers are not rounded
 * ```
 */
export function formatNumber(value: unknown, significant = 4): string {
  if (typeof value !== "number" || Number.isNaN(value)) return NOT_A_VALUE;
  if (value === Infinity) return "+∞";
  if (value === -Infinity) return "−∞";
  if (Number.isInteger(value) && Math.abs(value) < 1e15) return String(value);
  const rounded = Number(value.toPrecision(significant));
  return Number.isInteger(rounded) && Math.abs(rounded) >= 10 ** significant
    ? String(Math.round(value))
    : String(rounded);
}

/**
 * `value` with exactly `decimals` decimals, {@linkcode NOT_A_VALUE} for a
 * missing or non-finite value.
 *
 * @example
 * ```ts
 * import { formatFixed } from "./format_number.ts";
 * if (formatFixed(38.2049, 2) !== "38.20" || formatFixed(undefined, 1) !== "n/a") throw new Error();
 * ```
 */
export function formatFixed(value: unknown, decimals: number): string {
  if (typeof value !== "number" || !Number.isFinite(value)) return formatNumber(value);
  return value.toFixed(decimals);
}
