/**
 * The four ways quiver reports an auto spectrum, all derived from the core's
 * one-sided density G(f):
 *
 * | kind    | value per line                              | unit          |
 * |---------|---------------------------------------------|---------------|
 * | `psd`   | G(f)                                        | unit²/Hz      |
 * | `power` | G(f)·ENBW (power spectrum, mean square per line) | unit²         |
 * | `rms`   | √power                                      | unit (RMS)    |
 * | `peak`  | √(2·power), √power at DC and Nyquist        | unit (peak)   |
 *
 * `power`, `rms` and `peak` read a tone's amplitude correctly when it sits
 * on a line (and, through the flat-top window, anywhere between lines);
 * `psd` is the right kind for broadband signals.
 *
 * @module
 */
import { parseChoice } from "../choices.ts";
import { oneSidedWeights, scaleFactor, type SpectralEstimate } from "./spectral_core.ts";

/**
 * The spectrum kinds.
 *
 * @example
 * ```ts
 * import { SPECTRUM_KINDS } from "./spectrum_kinds.ts";
 * if (!SPECTRUM_KINDS.includes("psd")) throw new Error();
 * ```
 */
export const SPECTRUM_KINDS = ["psd", "power", "rms", "peak"] as const;

/** One of {@linkcode SPECTRUM_KINDS}. */
export type SpectrumKind = typeof SPECTRUM_KINDS[number];

/**
 * Narrows a user-supplied string to a {@linkcode SpectrumKind}.
 *
 * @throws {RangeError} for an unknown kind.
 *
 * @example
 * ```ts
 * import { parseSpectrumKind } from "./spectrum_kinds.ts";
 * if (parseSpectrumKind("rms") !== "rms") throw new Error();
 * ```
 */
export function parseSpectrumKind(kind: string): SpectrumKind {
  return parseChoice(kind, SPECTRUM_KINDS, "spectrum kind");
}

/**
 * Converts channel `index` of an estimate into the requested kind.
 *
 * @example
 * ```ts
 * import { spectralEstimate } from "./spectral_core.ts";
 * import { autoSpectrum } from "./spectrum_kinds.ts";
 * // A 2-unit-peak tone on line 16 of a 256-sample block, rectangular window.
 * const x = new Float64Array(256).map((_, i) => 2 * Math.cos(2 * Math.PI * 16 * i / 256));
 * const e = spectralEstimate([x], { rate: 256, block: 256, window: "rectangular", detrend: "none" });
 * if (Math.abs(autoSpectrum(e, 0, "peak")[16] - 2) > 1e-12) throw new Error();
 * ```
 */
export function autoSpectrum(
  estimate: SpectralEstimate,
  index: number,
  kind: SpectrumKind,
): Float64Array {
  const density = estimate.auto[index];
  if (density === undefined) {
    throw new RangeError(`the estimate has no channel ${index}`);
  }
  if (kind === "psd") return density.slice();
  const perLine = scaleFactor(estimate, "spectrum");
  const power = density.map((g) => g * perLine);
  if (kind === "power") return power;
  if (kind === "rms") return power.map(Math.sqrt);
  // A line's power is a one-sided mean square; a sinusoid's peak is √2 times
  // its RMS. DC and Nyquist were not doubled, so their peak is their RMS.
  const weights = oneSidedWeights(estimate.block);
  return power.map((p, k) => Math.sqrt(p * weights[k]));
}

/**
 * The unit of a spectrum of the given kind for a channel in `unit`. Compound
 * units are parenthesised before squaring; an empty unit counts as "1".
 *
 * @example
 * ```ts
 * import { spectrumUnit } from "./spectrum_kinds.ts";
 * if (spectrumUnit("m/s^2", "psd") !== "(m/s^2)^2/Hz") throw new Error();
 * if (spectrumUnit("Pa", "power") !== "Pa^2") throw new Error();
 * ```
 */
export function spectrumUnit(unit: string, kind: SpectrumKind): string {
  const base = unit.trim() === "" ? "1" : unit.trim();
  if (kind === "rms" || kind === "peak") return base;
  const squared = base === "1" ? "1" : /^[A-Za-zµμ°Ω]+$/.test(base) ? `${base}^2` : `(${base})^2`;
  return kind === "power" ? squared : `${squared}/Hz`;
}
