/**
 * What the spectral core gives (spectral_core.ts): the averaged, density-scaled
 * estimate with its auto and cross spectra, how segments are averaged, and
 * the scalings and metadata made from an estimate.
 *
 * @module
 */
import type { DetrendMode } from "./detrend.ts";
import type { WindowName } from "./windows.ts";

/**
 * How successive segment spectra are combined.
 *
 * @example
 * ```ts
 * import { AVERAGING_MODES } from "./spectral_estimate.ts";
 * if (AVERAGING_MODES[0] !== "linear") throw new Error(); // Welch's mean, the default
 * ```
 */
export const AVERAGING_MODES = ["linear", "exponential", "max"] as const;

/**
 * `linear`: the mean of all segments. `exponential`: a running average,
 * S ← (1−α)·S + α·P with α = 1 − exp(−Δt/τ), Δt the time between segment
 * starts, seeded with the first segment. `max`: the largest value per line
 * (auto spectra only; a maximum of complex cross spectra has no meaning).
 */
export type AveragingMode = typeof AVERAGING_MODES[number];

/** Named scaling of a spectrum, as in scipy.signal. */
export type Scaling = "density" | "spectrum";

/** One cross spectrum Gxy between reference channel x and response channel y. */
export interface CrossSpectrum {
  /** Index of x, the conjugated channel. */
  readonly x: number;
  /** Index of y. */
  readonly y: number;
  /** Real part, unitₓ·unitᵧ/Hz. */
  readonly re: Float64Array;
  /** Imaginary part, unitₓ·unitᵧ/Hz. */
  readonly im: Float64Array;
}

/** The averaged result of the core, density-scaled. */
export interface SpectralEstimate {
  /** Sample rate in Hz. */
  readonly rate: number;
  /** Samples per segment. */
  readonly block: number;
  /** Samples shared between consecutive segments. */
  readonly overlapSamples: number;
  /** Line spacing rate/block in Hz. */
  readonly df: number;
  /** Line frequencies 0, df, … in Hz. */
  readonly frequencies: Float64Array;
  /** Number of segments that went into the average. */
  readonly averages: number;
  /** Window name. */
  readonly window: WindowName;
  /** Detrend mode. */
  readonly detrend: DetrendMode;
  /** Averaging mode. */
  readonly average: AveragingMode;
  /** Exponential time constant in s (exponential averaging only). */
  readonly tau?: number;
  /** Equivalent noise bandwidth of one line in Hz: fs·Σw²/(Σw)². */
  readonly enbwHz: number;
  /** One-sided auto spectral density Gxx per channel, unit²/Hz. */
  readonly auto: readonly Float64Array[];
  /** The requested cross spectral densities. */
  readonly cross: readonly CrossSpectrum[];
}

/**
 * One-sided weights: 2 for every line except DC and, for an even block, the
 * Nyquist line, which have no negative-frequency twin. Written once, used by
 * every scaling.
 *
 * @example
 * ```ts
 * import { oneSidedWeights } from "./spectral_estimate.ts";
 * const w = oneSidedWeights(4);
 * if (w.join() !== "1,2,1") throw new Error();
 * ```
 */
export function oneSidedWeights(block: number): Float64Array {
  const lines = Math.floor(block / 2) + 1;
  const w = new Float64Array(lines).fill(2);
  w[0] = 1;
  if (block % 2 === 0) w[lines - 1] = 1;
  return w;
}

/**
 * Factor that turns the core's density (unit²/Hz) into the named scaling:
 * 1 for `"density"`, the ENBW in Hz for `"spectrum"` (unit² per line).
 *
 * @example
 * ```ts
 * import { scaleFactor } from "./spectral_estimate.ts";
 * const e = { enbwHz: 1.5 } as Parameters<typeof scaleFactor>[0];
 * if (scaleFactor(e, "spectrum") !== 1.5) throw new Error();
 * ```
 */
export function scaleFactor(
  estimate: Pick<SpectralEstimate, "enbwHz">,
  scaling: Scaling,
): number {
  return scaling === "density" ? 1 : estimate.enbwHz;
}
