/**
 * Band powers from an averaged narrowband spectrum: each line's mean square
 * G(f)·Δf is shared between bands in proportion to the part of its bin
 * [f − Δf/2, f + Δf/2] inside each band, after the line's weighting. A tone
 * exactly on a band edge, whose leakage is symmetric about the edge, thus
 * puts half its power (−3.01 dB) into each of the two bands.
 *
 * @module
 */
import type { Band } from "./bands.ts";
import { type Weighting, weightingPowerGain } from "./weighting.ts";

/** Band powers and how many lines each band spans. */
export interface BandPowers {
  /** Mean square per band, unit². */
  readonly power: Float64Array;
  /** Band width over line spacing. */
  readonly lines: Float64Array;
}

/**
 * Synthesises band powers from a one-sided density `density` (unit²/Hz) on
 * lines `frequencies` spaced `df` apart.
 *
 * @example
 * ```ts
 * import { band } from "./bands.ts";
 * import { bandPowersFromDensity } from "./band_synthesis.ts";
 * // White density 2 unit²/Hz: the 1 kHz third-octave (231.6 Hz wide) holds 463.2 unit².
 * const f = new Float64Array(4001).map((_, k) => k);
 * const p = bandPowersFromDensity({ frequencies: f, density: f.map(() => 2), df: 1 }, [band(0, 3)], "Z");
 * if (Math.abs(p.power[0] - 2 * (band(0, 3).upperHz - band(0, 3).lowerHz)) > 1e-9) throw new Error();
 * ```
 */
export function bandPowersFromDensity(
  spectrum: {
    /** Line frequencies, Hz, evenly spaced from 0. */
    frequencies: Float64Array;
    /** One-sided density per line, unit²/Hz. */
    density: Float64Array;
    /** Line spacing, Hz. */
    df: number;
  },
  bands: readonly Band[],
  weighting: Weighting,
): BandPowers {
  const { frequencies, density, df } = spectrum;
  const power = new Float64Array(bands.length);
  const lines = new Float64Array(bands.map((b) => (b.upperHz - b.lowerHz) / df));
  const gain = frequencies.map((f) => weightingPowerGain(weighting, f));
  bands.forEach((b, i) => {
    const first = Math.max(0, Math.floor(b.lowerHz / df - 0.5));
    const last = Math.min(frequencies.length - 1, Math.ceil(b.upperHz / df + 0.5));
    let sum = 0;
    for (let k = first; k <= last; k++) {
      const low = Math.max(frequencies[k] - df / 2, b.lowerHz);
      const high = Math.min(frequencies[k] + df / 2, b.upperHz);
      if (high > low) sum += density[k] * gain[k] * (high - low);
    }
    power[i] = sum;
  });
  return { power, lines };
}
