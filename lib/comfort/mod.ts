/**
 * Human vibration: the frequency weightings of ISO 2631-1 (whole body) and
 * ISO 5349-1 (hand-arm), and the values taken from a weighted acceleration
 * (a_w, MTVV, VDV, crest factor, vector sum, a_hv, A(8)). For engineering
 * comparison; not a certified measurement of a person's exposure.
 *
 * @example
 * ```ts
 * import { analyticResponse } from "./mod.ts";
 * // ISO 2631-1 Table 3 (from memory): Wk at 6.3 Hz is 1.054.
 * const h = analyticResponse("wk", 10 ** 0.8);
 * if (Math.abs(Math.hypot(h.re, h.im) - 1.054) > 0.002) throw new Error();
 * ```
 *
 * @module
 */
export {
  analyticResponse,
  leastRate,
  VIBRATION_WEIGHTINGS,
  type VibrationWeighting,
  weightingSections,
  worstDeviationDb,
} from "./vibration_weighting.ts";
export { VibrationMeter, type VibrationValues } from "./vibration_metrics.ts";
export { axisFactors, type Location, LOCATIONS, type Purpose, PURPOSES } from "./axis_factors.ts";
export {
  comfortAnalysis,
  type ComfortOptions,
  handArmAnalysis,
  type HandArmOptions,
  SAFETY_NOTE,
} from "./comfort_analysis.ts";
