/**
 * Frequency response functions: H1, H2, Hv with coherence from continuous
 * excitation, impact tests with hit detection, and FRF forms.
 *
 * @example
 * ```ts
 * import { convertFrfForm } from "./mod.ts";
 * // A receptance of 1 m/N at 1/(2π) Hz is a mobility of j·1 (m/s)/N.
 * const h = { re: new Float64Array([1]), im: new Float64Array([0]) };
 * const m = convertFrfForm(h, new Float64Array([1 / (2 * Math.PI)]), "receptance", "mobility");
 * if (Math.abs(m.im[0] - 1) > 1e-12 || Math.abs(m.re[0]) > 1e-12) throw new Error();
 * ```
 *
 * @module
 */
export { coherence, type Estimator, ESTIMATORS, frfEstimate } from "./estimators.ts";
export { convertFrfForm, FRF_FORMS, type FrfForm, frfUnit } from "./forms.ts";
export { frequencyResponse, type FrfOptions, type FrfResult } from "./frf_analysis.ts";
export type { FrfChannel, FrfData } from "./frf_data.ts";
export { hammerFrf, type HammerOptions, type HammerResult } from "./hammer.ts";
export { findHits, type Hit, type HitOptions, type HitStatus } from "./hits.ts";
