/**
 * MDF 4 channel conversions (CC blocks): the raw value a record holds to
 * the physical value. quiver applies identity (no CC block or type 0),
 * linear (type 1) and rational (type 2); every other type is named so that
 * a channel using it is refused by name and listed by `quiver info`.
 *
 * CC block layout, from memory of the standard: links cc_tx_name,
 * cc_md_unit, cc_md_comment, cc_cc_inverse, then cc_ref_count references;
 * data cc_type (u8), cc_precision (u8), cc_flags (u16), cc_ref_count (u16),
 * cc_val_count (u16), cc_phy_range_min and _max (f64), then cc_val_count
 * parameters (f64).
 *
 * @module
 */

/** The conversion types by cc_type number, as messages name them (from memory). */
export const CONVERSION_NAMES: readonly string[] = [
  "identity",
  "linear",
  "rational",
  "algebraic (formula)",
  "value-to-value table with interpolation",
  "value-to-value table without interpolation",
  "value-range-to-value table",
  "value-to-text table",
  "value-range-to-text table",
  "text-to-value table",
  "text-to-text table",
  "bit-field-to-text table",
];

/** A conversion quiver applies: identity, linear or rational. */
export type Conversion =
  | { readonly kind: "identity" }
  | { readonly kind: "linear"; readonly offset: number; readonly factor: number }
  | { readonly kind: "rational"; readonly p: readonly number[] };

/** The name of cc_type `type` in messages. */
export function conversionName(type: number): string {
  return CONVERSION_NAMES[type] ?? `unknown (type ${type})`;
}

/**
 * The conversion of a CC block's type and parameters, or a string saying
 * why quiver does not apply it.
 *
 * @example
 * ```ts
 * import { conversionOf } from "./mdf4_conversions.ts";
 * const c = conversionOf(1, [0.5, 2]);
 * if (typeof c === "string" || c.kind !== "linear" || c.factor !== 2) throw new Error();
 * if (conversionOf(7, []) !== "a value-to-text table conversion") throw new Error();
 * ```
 */
export function conversionOf(type: number, values: readonly number[]): Conversion | string {
  if (type === 0) return { kind: "identity" };
  // Linear: phys = P2·raw + P1 (cc_val[0] = P1, the offset; cc_val[1] = P2, the factor).
  if (type === 1) {
    if (values.length < 2) return "a linear conversion with fewer than 2 parameters";
    return { kind: "linear", offset: values[0], factor: values[1] };
  }
  // Rational: phys = (P1·x² + P2·x + P3) / (P4·x² + P5·x + P6).
  if (type === 2) {
    if (values.length < 6) return "a rational conversion with fewer than 6 parameters";
    return { kind: "rational", p: values.slice(0, 6) };
  }
  return `a ${conversionName(type)} conversion`;
}

/**
 * Applies `conversion` to `values` in place (raw to physical).
 *
 * @example
 * ```ts
 * import { applyConversion } from "./mdf4_conversions.ts";
 * const v = new Float64Array([1, 2]);
 * applyConversion({ kind: "rational", p: [0, 1, 0, 0, 0, 2] }, v);
 * if (v[0] !== 0.5 || v[1] !== 1) throw new Error();
 * ```
 */
export function applyConversion(conversion: Conversion, values: Float64Array): void {
  if (conversion.kind === "linear") {
    const { offset, factor } = conversion;
    for (let i = 0; i < values.length; i++) values[i] = factor * values[i] + offset;
  } else if (conversion.kind === "rational") {
    const [p1, p2, p3, p4, p5, p6] = conversion.p;
    for (let i = 0; i < values.length; i++) {
      const x = values[i];
      values[i] = (p1 * x * x + p2 * x + p3) / (p4 * x * x + p5 * x + p6);
    }
  }
}

/**
 * The physical value of one raw value (for the master channel's first and
 * last times).
 *
 * @example
 * ```ts
 * import { convertOne } from "./mdf4_conversions.ts";
 * if (convertOne({ kind: "linear", offset: 1, factor: 0.5 }, 4) !== 3) throw new Error();
 * ```
 */
export function convertOne(conversion: Conversion, raw: number): number {
  const v = new Float64Array([raw]);
  applyConversion(conversion, v);
  return v[0];
}
