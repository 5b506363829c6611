/**
 * Modes and damping from FRFs: peak picking, half-power bandwidth and SDOF
 * fit with quality flags.
 *
 * @example
 * ```ts
 * import { frequencyResponse } from "../frf/mod.ts";
 * import { modalDamping } from "./mod.ts";
 * // A 40 Hz mode (ζ 2 %) under random force: its displacement by the exact recursion.
 * const rate = 1024, n = 1 << 18, w = 2 * Math.PI * 40, zeta = 0.02, T = 1 / rate;
 * let seed = 7;
 * const force = new Float64Array(n).map(() => (seed = (seed * 16807) % 2147483647) / 2147483647 - 0.5);
 * const wd = w * Math.sqrt(1 - zeta * zeta), r = Math.exp(-zeta * w * T), tip = new Float64Array(n);
 * for (let i = 2; i < n; i++) tip[i] = 2 * r * Math.cos(wd * T) * tip[i - 1] - r * r * tip[i - 2] + (T / wd) * r * Math.sin(wd * T) * force[i - 1];
 * const rec = { rate, startTime: 0, channels: [{ name: "force", unit: "N", data: force }, { name: "tip", unit: "m", data: tip }] };
 * const { frf } = await frequencyResponse(rec, { input: "force", outputs: ["tip"], block: 4096 });
 * const [mode] = modalDamping(frf, { minHz: 20, maxHz: 80 }).modes;
 * if (Math.abs(mode.frequencyHz - 40) > 0.1 || Math.abs(mode.dampingRatio / zeta - 1) > 0.1) throw new Error();
 * ```
 *
 * @module
 */
export {
  DAMPING_FLAGS,
  DAMPING_METHODS,
  type DampingFlag,
  type DampingMethod,
} from "./damping_flags.ts";
export { type DampingOptions, type DampingResult, modalDamping } from "./damping_analysis.ts";
export { type ModeEstimate } from "./damping_estimates.ts";
export { firstMode } from "./first_mode.ts";
export { type FrfChannel, type FrfData, frfFromColumns, readFrfFile } from "./frf_input.ts";
export { findPeaks, judgeCoherence, type Peak } from "./peaks.ts";
export { halfPower, type HalfPowerEstimate } from "./half_power.ts";
export { fitSdof, type SdofFit } from "./sdof_fit.ts";
export { bestPairing, type ComplexVector, macMatrix, macValue } from "./mac.ts";
export {
  AMBIGUITY,
  correlateShapes,
  correlationTables,
  type ModePair,
  type ModeShape,
  pairRival,
  parsePointMap,
  parseShapes,
  type ShapeCorrelation,
} from "./shapes.ts";
export { fitResidues, lscfPoles, modalPhaseCollinearity, type Pole } from "./lscf.ts";
export {
  type FittedMode,
  type ModalDof,
  modalFit,
  type ModalFitOptions,
  type ModalFitResult,
} from "./modal_fit.ts";
export { modalTables } from "./modal_tables.ts";
export { type UnexplainedPeak } from "./unexplained_peaks.ts";
