/**
 * Order tracking of run-ups and run-downs: tacho pulses to speed, angle
 * resampling, order cuts and maps.
 *
 * @example
 * ```ts
 * import { motionFromRpm } from "./mod.ts";
 * const m = motionFromRpm(new Float64Array(1001).fill(600), 100); // 600 rpm for 10 s
 * if (Math.abs(m.angleAt(10) - 100) > 1e-9) throw new Error();
 * ```
 *
 * @module
 */
export {
  ORDER_METHODS,
  type OrderMethod,
  type OrderOptions,
  type OrderResult,
  trackOrders,
} from "./order_tracking.ts";
export { motionFromPulses, motionFromRpm, type ShaftMotion } from "./shaft_motion.ts";
export { tachoPulses } from "./tacho.ts";
export { type RpmSpectrogramOptions, spectrogramAgainstRpm } from "./rpm_spectrogram.ts";
export {
  type RpmStepOptions,
  rpmSteps,
  shaftMotion,
  type SpeedSource,
  timeAtRpm,
} from "./speed.ts";
