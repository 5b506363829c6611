/**
 * The prominence ratio of a tone (ECMA-418-1's PR method): the power in the
 * critical band centred on the tone over the mean of the powers in the two
 * critical bands beside it.
 *
 * @module
 */
import { type Band, bandAbove, bandBelow, bandPower, criticalBand } from "./critical_band.ts";

/**
 * Below this tone frequency the lower band would reach under 20 Hz: it then
 * runs from 20 Hz to the middle band and its power is scaled to a 100 Hz
 * band (ECMA-418-1, from memory; 171.4 Hz is where the band below the
 * middle one starts at 20 Hz).
 */
export const LOW_TONE_HZ = 171.4;

/** The lowest frequency of the lower band at low tone frequencies, Hz. */
const LOWEST_HZ = 20;

/** The three bands of a tone's prominence ratio, and the lower one's scale. */
export interface ProminenceBands {
  readonly lower: Band;
  readonly middle: Band;
  readonly upper: Band;
  /** The factor on the lower band's power (100 Hz over its width below {@linkcode LOW_TONE_HZ}, else 1). */
  readonly lowerScale: number;
}

/**
 * The bands of the prominence ratio of a tone at `f` Hz; undefined when the
 * lower band is empty (the middle band reaches down to 20 Hz).
 *
 * @example
 * ```ts
 * import { prominenceBands } from "./prominence_ratio.ts";
 * const b = prominenceBands(1000)!;
 * if (b.lower.high !== b.middle.low || b.upper.low !== b.middle.high || b.lowerScale !== 1) throw new Error();
 * if (prominenceBands(120)!.lower.low !== 20) throw new Error();
 * ```
 */
export function prominenceBands(f: number): ProminenceBands | undefined {
  const middle = criticalBand(f);
  const upper = bandAbove(middle.high);
  if (f < LOW_TONE_HZ) {
    if (!(middle.low > LOWEST_HZ)) return undefined;
    const lower = { low: LOWEST_HZ, high: middle.low };
    return { lower, middle, upper, lowerScale: 100 / (middle.low - LOWEST_HZ) };
  }
  const lower = bandBelow(middle.low);
  return lower === undefined ? undefined : { lower, middle, upper, lowerScale: 1 };
}

/**
 * PR = 10·lg(W_M / ((W_L + W_U)/2)) dB of a tone at `f` Hz in the
 * one-sided density `density` (lines `df` apart): W_M the power in the
 * critical band centred on the tone, W_L and W_U in the bands below and
 * above. NaN when the bands do not fit in the spectrum.
 *
 * @example
 * ```ts
 * import { prominenceRatio, prominenceBands } from "./prominence_ratio.ts";
 * // White noise alone: PR = 10·lg(Δf_M / mean(Δf_L, Δf_U)).
 * const g = new Float64Array(8001).fill(3e-5);
 * const b = prominenceBands(2000)!;
 * const w = (x: { low: number; high: number }) => x.high - x.low;
 * const expected = 10 * Math.log10(w(b.middle) / ((w(b.lower) + w(b.upper)) / 2));
 * if (Math.abs(prominenceRatio(g, 1, 2000) - expected) > 1e-9) throw new Error();
 * ```
 */
export function prominenceRatio(density: Float64Array, df: number, f: number): number {
  const bands = prominenceBands(f);
  if (bands === undefined || bands.upper.high > (density.length - 0.5) * df) return NaN;
  const power = (b: Band) => bandPower(density, df, b).power;
  const middle = power(bands.middle);
  const sides = (power(bands.lower) * bands.lowerScale + power(bands.upper)) / 2;
  return middle > 0 && sides > 0 ? 10 * Math.log10(middle / sides) : NaN;
}
