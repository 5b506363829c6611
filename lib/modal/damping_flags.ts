/**
 * The damping analysis's methods, the flags a candidate can carry and the
 * thresholds that set them.
 *
 * Flags (a candidate is reported even when flagged):
 * - `noise`: the mean coherence over the peak's own lines (its half-power
 *   band, at least 2 lines either side) and over 3 lines on at least one side
 *   beyond them is below 0.8 (common practice): nothing around the peak
 *   supports it. Listed, not numbered, never used for a target.
 * - `resolution_bias`: the coherence dips at the peak (below 0.9 at the peak
 *   line, or below 0.8 over its own lines) while 3 lines on each side reach
 *   0.8, and the half-power band holds fewer than 3 lines: the dip is the
 *   leakage (resolution) bias of a lightly damped peak (Harris' Shock and
 *   Vibration Handbook, ch. 21), not noise. Refine the resolution (a longer
 *   block) to measure this mode.
 * - `few_lines`: fewer than 8 lines inside the half-power band; the
 *   resolution bias of the half-power estimate is then large (common practice).
 * - `no_half_power`: a −3 dB point is not reached before the next peak or the
 *   table's edge.
 * - `low_coherence`: coherence at the peak line below 0.9.
 * - `close_modes`: another peak within two half-power bandwidths, too close
 *   to separate with single-mode methods.
 * - `disagree`: half-power and fit damping differ by more than 20 %.
 * - `poor_fit`: the fit's RMS misfit exceeds 10 % of the data.
 * - `no_fit`: the SDOF fit could not be made (too few lines around the peak,
 *   or it did not converge to a pole with positive frequency and damping).
 *   With no estimate at all the mode is still reported, at its peak line,
 *   with empty damping cells: one poor peak never fails the analysis.
 * - `implausible_damping`: an estimate of ζ above 1, not finite, or below
 *   1e-6 (a fit collapsed onto an undamped pole), before or after the window
 *   correction: no damped resonance has it. That estimate is dropped (its
 *   cells left empty), and the candidate's `notes` say which and why.
 * - `magnitude_only`: no phase in the table; the fit used |H| alone.
 * - `form_assumed`: the FRF form is unknown and receptance was assumed.
 * - `window_dominates`: the exponential window's added damping is more than
 *   half the measured damping, so the corrected value is unreliable.
 *
 * @module
 */

/**
 * Which estimates to make.
 *
 * @example
 * ```ts
 * import { DAMPING_METHODS } from "./damping_flags.ts";
 * if (!DAMPING_METHODS.includes("both")) throw new Error();
 * ```
 */
export const DAMPING_METHODS = ["half-power", "sdof-fit", "both"] as const;

/** One of {@linkcode DAMPING_METHODS}. */
export type DampingMethod = typeof DAMPING_METHODS[number];

/**
 * Every flag a candidate can carry (their meanings are in this module's
 * header and README's `quiver damping` section).
 *
 * @example
 * ```ts
 * import { DAMPING_FLAGS } from "./damping_flags.ts";
 * if (!DAMPING_FLAGS.includes("noise") || !DAMPING_FLAGS.includes("resolution_bias")) throw new Error();
 * ```
 */
export const DAMPING_FLAGS = [
  "noise",
  "resolution_bias",
  "low_coherence",
  "few_lines",
  "no_half_power",
  "close_modes",
  "disagree",
  "poor_fit",
  "no_fit",
  "implausible_damping",
  "magnitude_only",
  "form_assumed",
  "window_dominates",
] as const;

/** One of {@linkcode DAMPING_FLAGS}. */
export type DampingFlag = typeof DAMPING_FLAGS[number];

/** Fewer lines than this inside the half-power band: `few_lines` (common practice). */
export const FEW_LINES = 8;
/** Below this many lines in the half-power band a confined coherence dip is resolution bias. */
export const RESOLUTION_BIAS_LINES = 3;
/** Coherence at the peak line below this: `low_coherence`. */
export const LOW_COHERENCE = 0.9;
/** Half-power and fit damping differing by more than this share: `disagree`. */
export const DISAGREEMENT = 0.2;
/** A fit's RMS misfit above this share of the data: `poor_fit`. */
export const POOR_FIT = 0.1;
/** Coherence below which the lines around a peak do not support it (common practice). */
export const USABLE_COHERENCE = 0.8;

/**
 * Below this a damping estimate is a fit that collapsed onto an undamped pole, not a
 * measurement: no structure of vehicle NVH is damped this lightly (common practice), and
 * the Q it implies (above 500 000) is not measurable with a finite record.
 */
export const LEAST_DAMPING = 1e-6;

/**
 * A damping estimate no damped resonance can have: above 1, not finite, or below 1e-6
 * (`implausible_damping`).
 *
 * @example
 * ```ts
 * import { implausible } from "./damping_flags.ts";
 * if (!implausible(1.2) || !implausible(NaN) || !implausible(1e-9) || implausible(0.02)) throw new Error();
 * ```
 */
export const implausible = (zeta: number): boolean => !(zeta >= LEAST_DAMPING && zeta <= 1);
