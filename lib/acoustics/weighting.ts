/**
 * Frequency weightings A, C and Z of IEC 61672-1:2013.
 *
 * Analytic form (Annex E): with f₁ = 20.598997 Hz, f₂ = 107.65265 Hz,
 * f₃ = 737.86223 Hz and f₄ = 12194.217 Hz,
 *
 *   C(f) = 20·log10[f₄²f² / ((f² + f₁²)(f² + f₄²))] − C₁₀₀₀
 *   A(f) = 20·log10[f₄²f⁴ / ((f² + f₁²)·√(f² + f₂²)·√(f² + f₃²)·(f² + f₄²))] − A₁₀₀₀
 *
 * where C₁₀₀₀ and A₁₀₀₀ are the unnormalised values at 1 kHz (about −0.062
 * and −2.000 dB), computed here rather than typed in. Z is 0 dB everywhere.
 *
 * The digital filter splits the analogue weighting into high-pass sections
 * s²/((s + ω₁)²) (and, for A, s²/((s + ω₂)(s + ω₃))), mapped by the bilinear
 * transform with each pole pre-warped to its analogue frequency, and the
 * low-pass 1/(1 + s/ω₄)². The bilinear transform would put that low-pass's
 * zeros at fs/2 and cut the response to nothing there; instead its poles are
 * matched (z = e^(sT)) and its first-order numerator is chosen so that its
 * magnitude equals the analogue one at 0 Hz and at f₄ (the magnitude-matching
 * idea of Vicanek 2016, "Matched second order digital filters"; derived here
 * for this section). The cascade is normalised at 1 kHz.
 * {@linkcode weightingFilterLimitHz} states up to where it stays within
 * 0.5 dB of the analytic weighting.
 *
 * @module
 */
import { parseChoice } from "../choices.ts";
import { type Biquad, cascadeResponse, normaliseCascade, sectionFromRoots } from "./biquad.ts";

/**
 * The frequency weightings.
 *
 * @example
 * ```ts
 * import { WEIGHTINGS } from "./weighting.ts";
 * if (!WEIGHTINGS.includes("A")) throw new Error();
 * ```
 */
export const WEIGHTINGS = ["A", "C", "Z"] as const;

/** One of {@linkcode WEIGHTINGS}. */
export type Weighting = typeof WEIGHTINGS[number];

/**
 * Narrows a user-supplied string to a {@linkcode Weighting}.
 *
 * @example
 * ```ts
 * import { parseWeighting } from "./weighting.ts";
 * if (parseWeighting("A") !== "A") throw new Error();
 * ```
 */
export function parseWeighting(name: string): Weighting {
  return parseChoice(name, WEIGHTINGS, "frequency weighting");
}

/** IEC 61672-1:2013 Annex E pole frequencies, Hz. */
export const WEIGHTING_POLES_HZ = {
  f1: 20.598997,
  f2: 107.65265,
  f3: 737.86223,
  f4: 12194.217,
} as const;

const { f1, f2, f3, f4 } = WEIGHTING_POLES_HZ;

function unnormalisedDb(weighting: Weighting, f: number): number {
  const f2sq = f * f;
  if (weighting === "Z") return 0;
  if (weighting === "C") {
    return 20 * Math.log10((f4 * f4 * f2sq) / ((f2sq + f1 * f1) * (f2sq + f4 * f4)));
  }
  return 20 * Math.log10(
    (f4 * f4 * f2sq * f2sq) /
      ((f2sq + f1 * f1) * Math.sqrt(f2sq + f2 * f2) * Math.sqrt(f2sq + f3 * f3) * (f2sq + f4 * f4)),
  );
}

const AT_1000 = { A: unnormalisedDb("A", 1000), C: unnormalisedDb("C", 1000), Z: 0 };

/**
 * The weighting in dB at `frequency` Hz (−Infinity at 0 Hz for A and C).
 *
 * @example
 * ```ts
 * import { weightingDb } from "./weighting.ts";
 * if (Math.abs(weightingDb("A", 100) + 19.1) > 0.05) throw new Error(); // IEC 61672-1 Table 3
 * ```
 */
export function weightingDb(weighting: Weighting, frequency: number): number {
  if (weighting === "Z") return 0;
  if (frequency <= 0) return -Infinity;
  return unnormalisedDb(weighting, frequency) - AT_1000[weighting];
}

/**
 * The weighting as a factor on power (mean square): 10^(W/10).
 *
 * @example
 * ```ts
 * import { weightingPowerGain } from "./weighting.ts";
 * if (Math.abs(weightingPowerGain("C", 1000) - 1) > 1e-12) throw new Error();
 * ```
 */
export function weightingPowerGain(weighting: Weighting, frequency: number): number {
  return weighting === "Z" ? 1 : 10 ** (weightingDb(weighting, frequency) / 10);
}

/** The z-plane image of a real analogue pole at −2πf, pre-warped. */
function digitalPole(f: number, rate: number): { re: number; im: number } {
  const warped = Math.tan((Math.PI * f) / rate); // Ω'/(2fs)
  return { re: (1 - warped) / (1 + warped), im: 0 };
}

/**
 * The digital weighting filter for sample rate `rate`, as biquad sections
 * (none for Z).
 *
 * @throws {RangeError} when the rate is too low to place the poles (f₄ must lie below fs/2).
 *
 * @example
 * ```ts
 * import { cascadeResponse } from "./biquad.ts";
 * import { weightingFilter } from "./weighting.ts";
 * const h = cascadeResponse(weightingFilter("A", 48000), 1000, 48000);
 * if (Math.abs(Math.hypot(h.re, h.im) - 1) > 1e-12) throw new Error();
 * ```
 */
export function weightingFilter(weighting: Weighting, rate: number): Biquad[] {
  if (weighting === "Z") return [];
  if (!(rate > 2 * f4)) {
    throw new RangeError(
      `${weighting}-weighting as a digital filter needs a sample rate above ${
        2 * f4
      } Hz, got ${rate}`,
    );
  }
  const one = { re: 1, im: 0 };
  const p1 = digitalPole(f1, rate);
  const sections = [sectionFromRoots([one, one], [p1, p1]), matchedLowPass(f4, rate)];
  if (weighting === "A") {
    sections.push(sectionFromRoots([one, one], [digitalPole(f2, rate), digitalPole(f3, rate)]));
  }
  return normaliseCascade(sections, 1000, rate, 1);
}

/**
 * 1/(1 + s/ω₀)² with matched poles, a double real pole at e^(−ω₀T), and the
 * numerator b₀ + b₁z⁻¹ fixed by |H| = 1 at 0 Hz and |H| = ½ at f₀ (the
 * analogue values). |b₀ + b₁e^(−iω)|² = (b₀ + b₁)²·cos²(ω/2) + (b₀ − b₁)²·sin²(ω/2).
 */
function matchedLowPass(f0: number, rate: number): Biquad {
  const w0 = (2 * Math.PI * f0) / rate;
  const r = Math.exp(-w0);
  const a1 = -2 * r;
  const a2 = r * r;
  const dcSquared = (1 + a1 + a2) ** 2; // |A(1)|², so that |H(1)| = 1
  const ar = 1 + a1 * Math.cos(w0) + a2 * Math.cos(2 * w0);
  const ai = -a1 * Math.sin(w0) - a2 * Math.sin(2 * w0);
  const atF0 = 0.25 * (ar * ar + ai * ai); // |B|² needed at f₀: ¼·|A(e^{iω₀})|²
  const c = Math.cos(w0 / 2) ** 2;
  const s = Math.sin(w0 / 2) ** 2;
  const nyquistSquared = (atF0 - dcSquared * c) / s;
  if (!(nyquistSquared >= 0)) {
    throw new RangeError(`a low-pass at ${f0} Hz cannot be matched at a sample rate of ${rate} Hz`);
  }
  const sumRoot = Math.sqrt(dcSquared);
  const differenceRoot = Math.sqrt(nyquistSquared);
  return {
    b0: (sumRoot + differenceRoot) / 2,
    b1: (sumRoot - differenceRoot) / 2,
    b2: 0,
    a1,
    a2,
  };
}

/**
 * The highest frequency up to which the digital filter at `rate` stays
 * within 0.5 dB of the analytic weighting (searched on a 1/24-octave grid
 * from 10 Hz), for stating the filter's valid range.
 */
export function weightingFilterLimitHz(weighting: Weighting, rate: number): number {
  if (weighting === "Z") return rate / 2;
  const sections = weightingFilter(weighting, rate);
  let limit = 10;
  for (let f = 10; f < rate / 2; f *= 2 ** (1 / 24)) {
    const h = cascadeResponse(sections, f, rate);
    if (Math.abs(20 * Math.log10(Math.hypot(h.re, h.im)) - weightingDb(weighting, f)) > 0.5) break;
    limit = f;
  }
  return limit;
}
