/**
 * The tables of ISO 532-1:2017's stationary method (Zwicker's method, the
 * method of DIN 45631:1991 and ISO 532 B), typed from memory: check them
 * against the standard before quiver's loudness is used where the standard
 * is required. The 28 one-third-octave bands run from 25 Hz to 12.5 kHz; the
 * first eleven (25–250 Hz) are weighted at low frequency and grouped into the
 * first three critical bands, the other seventeen stand for one critical band
 * each (20 in all).
 *
 * @module
 */
import { band } from "../acoustics/bands.ts";

/** The IEC 61260-1 band number of the method's first one-third octave (25 Hz). */
export const FIRST_BAND_INDEX = -16;

/** The method's number of one-third octaves. */
export const BAND_COUNT = 28;

/**
 * Nominal mid-band frequencies of the method's 28 one-third octaves, Hz (IEC
 * 61260-1 bands −16 … 11, 25 Hz … 12.5 kHz), from the one band plan.
 */
export const THIRD_OCTAVE_HZ: readonly number[] = Array.from(
  { length: BAND_COUNT },
  (_, i) => band(FIRST_BAND_INDEX + i, 3).nominalHz,
);

/** The number of approximated critical bands of the core loudness. */
export const CRITICAL_BAND_COUNT = 20;

/**
 * Upper limits of the level ranges of the low-frequency weighting, dB
 * (ISO 532-1:2017 Annex A, from memory).
 */
export const LOW_RANGE_DB: readonly number[] = [45, 55, 65, 71, 80, 90, 100, 120];

/**
 * Level corrections of the eleven lowest one-third octaves (25 … 250 Hz) per
 * level range, dB: one row per range of {@linkcode LOW_RANGE_DB}
 * (ISO 532-1:2017 Annex A, from memory). The equal-loudness contours bend
 * up at low frequency, and flatten at high level.
 */
export const LOW_CORRECTION_DB: readonly (readonly number[])[] = [
  [-32, -24, -16, -10, -5, 0, -7, -3, 0, -2, 0],
  [-29, -22, -15, -10, -4, 0, -7, -2, 0, -2, 0],
  [-27, -19, -14, -9, -4, 0, -6, -2, 0, -2, 0],
  [-25, -17, -12, -9, -3, 0, -5, -2, 0, -2, 0],
  [-23, -16, -11, -7, -3, 0, -4, -1, 0, -1, 0],
  [-20, -14, -10, -6, -3, 0, -4, -1, 0, -1, 0],
  [-18, -12, -9, -6, -2, 0, -3, -1, 0, -1, 0],
  [-15, -10, -8, -4, -2, 0, -3, -1, 0, -1, 0],
];

/** How many of the eleven low one-third octaves each of the first three critical bands takes (6 + 3 + 2). */
export const LOW_GROUPS: readonly number[] = [6, 3, 2];

/**
 * Attenuation a₀ of the transmission through the outer ear in free field
 * per critical band, dB (ISO 532-1:2017 Annex A, from memory); negative
 * where the ear canal's resonance raises the level at the ear drum.
 */
export const OUTER_EAR_DB: readonly number[] = [
  0,
  0,
  0,
  0,
  0,
  0,
  0,
  0,
  0,
  0,
  -0.5,
  -1.6,
  -3.2,
  -5.4,
  -5.6,
  -4.0,
  -1.5,
  2.0,
  5.0,
  12.0,
];

/**
 * Level difference of a diffuse field against a free field per critical
 * band, dB, added in diffuse field (ISO 532-1:2017 Annex A, from memory).
 */
export const DIFFUSE_DB: readonly number[] = [
  0,
  0,
  0.5,
  0.9,
  1.2,
  1.6,
  2.3,
  2.8,
  3.0,
  2.0,
  0,
  -1.4,
  -2.0,
  -1.9,
  -1.0,
  0.5,
  3.0,
  4.0,
  4.3,
  4.0,
];

/**
 * Correction from the one-third-octave level to the critical band's level
 * (their bandwidths differ), dB, subtracted (ISO 532-1:2017 Annex A, from memory).
 */
export const BANDWIDTH_DB: readonly number[] = [
  -0.25,
  -0.6,
  -0.8,
  -0.8,
  -0.5,
  0,
  0.5,
  1.1,
  1.5,
  1.7,
  1.8,
  1.8,
  1.7,
  1.6,
  1.4,
  1.2,
  0.8,
  0.5,
  0,
  -0.5,
];

/**
 * Excitation level at the threshold in quiet per critical band, dB
 * (ISO 532-1:2017 Annex A, from memory).
 */
export const THRESHOLD_DB: readonly number[] = [
  30,
  18,
  12,
  8,
  7,
  6,
  5,
  4,
  3,
  3,
  3,
  3,
  3,
  3,
  3,
  3,
  3,
  3,
  3,
  3,
];

/**
 * Upper limits of the approximated critical bands, Bark, and a 21st limit
 * that leaves room for the last band's upper slope (ISO 532-1:2017 Annex A,
 * from memory).
 */
export const BAND_TOP_BARK: readonly number[] = [
  0.9,
  1.8,
  2.8,
  3.5,
  4.4,
  5.4,
  6.6,
  7.9,
  9.2,
  10.6,
  12.3,
  13.8,
  15.2,
  16.7,
  18.1,
  19.3,
  20.6,
  21.8,
  22.7,
  23.6,
  24.0,
];

/**
 * Specific loudness at the lower end of each range of the upper slopes,
 * sone/Bark (ISO 532-1:2017 Annex A, from memory).
 */
export const SLOPE_RANGE: readonly number[] = [
  18,
  16,
  14,
  12,
  10,
  8,
  6,
  4,
  3,
  2.5,
  2,
  1.5,
  1,
  0.75,
  0.5,
  0.3,
  0.2,
  0.1,
];

/**
 * Steepness of the upper slopes, sone/Bark per Bark: one row per range of
 * {@linkcode SLOPE_RANGE}, one column per critical band from which the slope
 * falls (the eighth for the eighth and every band above). From memory, and
 * the least sure of these tables below the first four rows: ISO 532-1:2017
 * Annex A is the authority. The suspects, by the sone scale at 1 kHz
 * (README, "Not a certified meter"; tests/reference/make_zwicker_reference.py):
 * the last column in the ranges from 0.3 to 4 sone/Bark. A lone 1 kHz band
 * comes out 1.0 to 1.9 phon loud from 50 to 80 dB, all of it in its upper
 * slope, which only that column shapes; 17 % steeper there would meet the
 * scale within 0.4 phon from 50 to 80 dB (0.65 phon under at 40 dB). Not
 * changed: no source at hand says whether the entries or the method's own
 * departure from the scale is the cause.
 */
export const UPPER_SLOPE: readonly (readonly number[])[] = [
  [13.0, 8.2, 5.7, 5.0, 5.0, 5.0, 5.0, 5.0],
  [9.0, 7.5, 6.0, 5.1, 4.5, 4.5, 4.5, 4.5],
  [7.8, 6.7, 5.6, 4.9, 4.4, 3.9, 3.9, 3.9],
  [6.5, 6.0, 5.1, 4.5, 3.9, 3.2, 3.2, 3.2],
  [5.6, 5.0, 4.5, 3.9, 3.2, 2.7, 2.7, 2.7],
  [4.2, 3.8, 3.3, 2.8, 2.4, 2.0, 2.0, 2.0],
  [3.2, 2.9, 2.5, 2.2, 1.8, 1.5, 1.5, 1.5],
  [2.8, 2.5, 2.1, 1.9, 1.6, 1.3, 1.3, 1.3],
  [1.6, 1.5, 1.2, 1.1, 0.95, 0.85, 0.85, 0.85],
  [1.5, 1.4, 1.1, 1.0, 0.9, 0.75, 0.75, 0.75],
  [1.3, 1.2, 1.0, 0.9, 0.75, 0.65, 0.65, 0.65],
  [1.1, 1.0, 0.85, 0.75, 0.65, 0.55, 0.55, 0.55],
  [0.9, 0.8, 0.7, 0.6, 0.5, 0.45, 0.45, 0.45],
  [0.7, 0.6, 0.55, 0.45, 0.4, 0.35, 0.35, 0.35],
  [0.5, 0.45, 0.4, 0.35, 0.3, 0.25, 0.25, 0.25],
  [0.35, 0.3, 0.28, 0.25, 0.2, 0.17, 0.17, 0.17],
  [0.25, 0.22, 0.2, 0.18, 0.15, 0.12, 0.12, 0.12],
  [0.15, 0.13, 0.12, 0.1, 0.09, 0.08, 0.08, 0.08],
];

/** Steps of the specific loudness along the critical-band rate, Bark. */
export const BARK_STEP = 0.1;

/** Number of steps from 0 to 24 Bark. */
export const BARK_COUNT = 240;
