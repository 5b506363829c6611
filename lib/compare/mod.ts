/**
 * Test against simulation and targets: common grid, dB difference, FRAC,
 * peak matching, single-value and limit-curve checks.
 *
 * @example
 * ```ts
 * import { checkValue } from "./mod.ts";
 * const r = checkValue({ id: "first_mode", description: "first mode", value: 41.2, kind: "min", limit: 38, unit: "Hz" });
 * if (!r.pass || Math.abs(r.margin - 3.2) > 1e-12) throw new Error();
 * ```
 *
 * @module
 */
export { compareCurves, type CompareOptions, type ComparisonResult } from "./comparison.ts";
export { type Curve, curveFromColumns, readCurveFile } from "./curve_input.ts";
export { frac } from "./frac.ts";
export { checkCurve, checkValue, type TargetResult } from "./targets.ts";
export { matchUnits } from "./unit_match.ts";
