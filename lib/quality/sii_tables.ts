/**
 * The one-third octave band procedure's table of ANSI S3.5-1997 (Table 3):
 * for each of its 18 bands, 160 Hz to 8 kHz, the band importance function
 * (average speech), the reference internal noise spectrum level and the
 * standard speech spectrum level of normal vocal effort.
 *
 * The values are typed from memory of the standard's Table 3; the band
 * importances sum to 1.0000, as the standard's do.
 *
 * @module
 */

/** The standard and edition the speech intelligibility index follows. */
export const SII_STANDARD = "ANSI S3.5-1997 (one-third octave band procedure, Table 3)";

/** One band of Table 3. */
export interface SiiBand {
  /** Nominal centre frequency F_i, Hz. */
  readonly centerHz: number;
  /** Band importance I_i (average speech). */
  readonly importance: number;
  /** Reference internal noise spectrum level X_i, dB re 20 µPa per Hz. */
  readonly internalNoiseDb: number;
  /** Standard speech spectrum level U_i, normal vocal effort, dB re 20 µPa per Hz. */
  readonly speechDb: number;
}

// from memory: ANSI S3.5-1997 Table 3, columns F_i, I_i, X_i and U_i (normal vocal effort).
const TABLE_3: readonly (readonly [number, number, number, number])[] = [
  [160, 0.0083, 0.6, 32.41],
  [200, 0.0095, -1.7, 34.48],
  [250, 0.0150, -3.9, 34.75],
  [315, 0.0289, -6.1, 33.98],
  [400, 0.0440, -8.2, 34.59],
  [500, 0.0578, -9.7, 34.27],
  [630, 0.0653, -10.8, 32.06],
  [800, 0.0711, -11.9, 28.30],
  [1000, 0.0818, -12.5, 25.01],
  [1250, 0.0844, -13.5, 23.00],
  [1600, 0.0882, -15.4, 20.15],
  [2000, 0.0898, -17.7, 17.32],
  [2500, 0.0868, -21.2, 13.18],
  [3150, 0.0844, -24.2, 11.55],
  [4000, 0.0771, -25.9, 9.33],
  [5000, 0.0527, -23.6, 5.31],
  [6300, 0.0364, -15.8, 2.59],
  [8000, 0.0185, -7.1, 1.13],
];

/**
 * The 18 bands of the one-third octave band procedure, lowest first.
 *
 * @example
 * ```ts
 * import { SII_BANDS } from "./sii_tables.ts";
 * if (SII_BANDS.length !== 18 || SII_BANDS[8].centerHz !== 1000) throw new Error();
 * const total = SII_BANDS.reduce((s, b) => s + b.importance, 0);
 * if (Math.abs(total - 1) > 1e-9) throw new Error();
 * ```
 */
export const SII_BANDS: readonly SiiBand[] = TABLE_3.map((
  [centerHz, importance, internalNoiseDb, speechDb],
) => ({ centerHz, importance, internalNoiseDb, speechDb }));
