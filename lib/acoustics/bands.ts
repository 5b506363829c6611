/**
 * Fractional-octave bands of IEC 61260-1:2014, base-10 system.
 *
 * Octave ratio G = 10^(3/10). For a bandwidth designator b (1 for octaves,
 * 3 for thirds, 6, 12, 24) the exact mid-band frequencies are
 * fₘ = 1000·G^(x/b) Hz for odd b and fₘ = 1000·G^((2x + 1)/(2b)) Hz for even b,
 * x an integer (formulas 2 and 3), and the band edges are fₘ·G^(∓1/(2b))
 * (formulas 4 and 5).
 *
 * Nominal labels: for octave and one-third-octave bands the preferred
 * numbers of IEC 61260-1 (the R10 series: 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5,
 * 6.3, 8 per decade). Other fractions have no nominal series; their label is
 * the exact mid-band frequency to three significant figures.
 *
 * @module
 */
import { parseChoice } from "../choices.ts";

/**
 * The bandwidth designators quiver offers.
 *
 * @example
 * ```ts
 * import { BAND_FRACTIONS } from "./bands.ts";
 * if (BAND_FRACTIONS[1] !== 3) throw new Error(); // one-third octaves
 * ```
 */
export const BAND_FRACTIONS = [1, 3, 6, 12, 24] as const;

/** One of {@linkcode BAND_FRACTIONS}. */
export type BandFraction = typeof BAND_FRACTIONS[number];

/**
 * Narrows a user-supplied string to a {@linkcode BandFraction}.
 *
 * @example
 * ```ts
 * import { parseBandFraction } from "./bands.ts";
 * if (parseBandFraction("3") !== 3) throw new Error();
 * ```
 */
export function parseBandFraction(text: string): BandFraction {
  return Number(parseChoice(text, BAND_FRACTIONS.map(String), "band fraction")) as BandFraction;
}

/** The octave ratio of the base-10 system, 10^(3/10). */
export const OCTAVE_RATIO = 10 ** 0.3;

/** One band. */
export interface Band {
  /** Band number x. */
  readonly index: number;
  /** Exact mid-band frequency, Hz. */
  readonly centerHz: number;
  /** Nominal (label) frequency, Hz. */
  readonly nominalHz: number;
  /** Lower edge, Hz. */
  readonly lowerHz: number;
  /** Upper edge, Hz. */
  readonly upperHz: number;
}

const R10 = [1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8];

/**
 * The exact mid-band frequency of band `index` for designator `b`.
 *
 * @example
 * ```ts
 * import { midbandHz } from "./bands.ts";
 * if (Math.abs(midbandHz(-10, 3) - 100) > 1e-9) throw new Error(); // IEC 61260-1 formula 2
 * ```
 */
export function midbandHz(index: number, b: BandFraction): number {
  const exponent = b % 2 === 1 ? index / b : (2 * index + 1) / (2 * b);
  return 1000 * OCTAVE_RATIO ** exponent;
}

function nominalHz(index: number, b: BandFraction, center: number): number {
  if (b === 1 || b === 3) {
    const third = b === 1 ? 3 * index : index;
    const decade = Math.floor(third / 10);
    const mantissa = R10[third - 10 * decade];
    // 1/1-octave 16 kHz and 31.5 Hz follow the same series; round off binary noise.
    return Number((mantissa * 10 ** (3 + decade)).toPrecision(6));
  }
  return Number(center.toPrecision(3));
}

/**
 * Band `index` for designator `b`.
 *
 * @example
 * ```ts
 * import { band } from "./bands.ts";
 * const b = band(0, 3);
 * if (b.nominalHz !== 1000 || Math.abs(b.lowerHz - 891.2509) > 1e-4) throw new Error();
 * ```
 */
export function band(index: number, b: BandFraction): Band {
  const centerHz = midbandHz(index, b);
  const half = OCTAVE_RATIO ** (1 / (2 * b));
  return {
    index,
    centerHz,
    nominalHz: nominalHz(index, b, centerHz),
    lowerHz: centerHz / half,
    upperHz: centerHz * half,
  };
}

/**
 * Every band whose mid-band frequency lies in [minHz, maxHz], in order.
 *
 * @throws {RangeError} for an empty or non-positive range.
 *
 * @example
 * ```ts
 * import { bandsInRange } from "./bands.ts";
 * const thirds = bandsInRange(3, 25, 20000);
 * if (thirds.length !== 30 || thirds[0].nominalHz !== 25) throw new Error();
 * ```
 */
export function bandsInRange(b: BandFraction, minHz: number, maxHz: number): Band[] {
  if (!(minHz > 0) || !(maxHz > minHz)) {
    throw new RangeError(`band range must satisfy 0 < min < max, got ${minHz}–${maxHz} Hz`);
  }
  // Invert fₘ = 1000·G^(e) for the first and last index, then step.
  const exponentOf = (f: number) => Math.log(f / 1000) / Math.log(OCTAVE_RATIO);
  const indexOf = (
    f: number,
  ) => (b % 2 === 1 ? b * exponentOf(f) : (2 * b * exponentOf(f) - 1) / 2);
  const first = Math.ceil(indexOf(minHz) - 1e-9);
  const last = Math.floor(indexOf(maxHz) + 1e-9);
  const bands: Band[] = [];
  for (let x = first; x <= last; x++) bands.push(band(x, b));
  return bands;
}

/**
 * The band whose pass-band holds `hz`: the one whose exact mid-band
 * frequency is nearest on a logarithmic scale (the edges are the geometric
 * means of neighbouring mid-band frequencies). 20 Hz thus names the
 * one-third octave of exact mid-band 19.95 Hz, nominally 20 Hz.
 *
 * @throws {RangeError} for a frequency that is not positive.
 *
 * @example
 * ```ts
 * import { bandHolding } from "./bands.ts";
 * if (bandHolding(20, 3).nominalHz !== 20 || bandHolding(20, 3).centerHz > 20) throw new Error();
 * ```
 */
export function bandHolding(hz: number, b: BandFraction): Band {
  if (!(hz > 0) || !Number.isFinite(hz)) {
    throw new RangeError(`a band's frequency must be positive, got ${hz} Hz`);
  }
  const exponent = Math.log(hz / 1000) / Math.log(OCTAVE_RATIO);
  // Odd b: fₘ = 1000·G^(x/b); even b: fₘ = 1000·G^((2x + 1)/(2b)) (IEC 61260-1 formulas 2, 3).
  const index = b % 2 === 1 ? Math.round(b * exponent) : Math.round((2 * b * exponent - 1) / 2);
  return band(index, b);
}

/**
 * The bands from the one holding `fromHz` to the one holding `toHz`
 * ({@linkcode bandHolding}): a range named by frequencies such as 20 Hz and
 * 20 kHz takes the bands of those nominal labels, although their exact
 * mid-band frequencies (19.95 Hz, 19.95 kHz) lie just inside or outside.
 *
 * @throws {RangeError} for an empty or non-positive range.
 *
 * @example
 * ```ts
 * import { bandsHolding } from "./bands.ts";
 * const thirds = bandsHolding(3, 20, 20000);
 * if (thirds.length !== 31 || thirds[0].nominalHz !== 20 || thirds[30].nominalHz !== 20000) throw new Error();
 * ```
 */
export function bandsHolding(b: BandFraction, fromHz: number, toHz: number): Band[] {
  if (!(fromHz > 0) || !(toHz > fromHz)) {
    throw new RangeError(`band range must satisfy 0 < min < max, got ${fromHz}–${toHz} Hz`);
  }
  const first = bandHolding(fromHz, b).index, last = bandHolding(toHz, b).index;
  const bands: Band[] = [];
  for (let x = first; x <= last; x++) bands.push(band(x, b));
  return bands;
}
