/**
 * The frequency weightings of human vibration: Wk, Wd, Wf, Wc, We and Wj of
 * ISO 2631-1:1997 Annex A (whole body) and Wh of ISO 5349-1:2001 Annex A
 * (hand and arm, as ISO 8041-1 restates it), each as its analytic complex
 * response H(f) and as a digital filter.
 *
 * Every weighting is the product of a band limitation (a second-order
 * Butterworth high-pass at f₁ and low-pass at f₂), an acceleration–velocity
 * transition
 *
 *   Ht(s) = (1 + s/ω₃) / (1 + s/(Q₄ω₄) + s²/ω₄²)
 *
 * and an upward step
 *
 *   Hs(s) = (1 + s/(Q₅ω₅) + s²/ω₅²) / (1 + s/(Q₆ω₆) + s²/ω₆²) · (ω₅/ω₆)²,
 *
 * times a gain K; an infinite f₃…f₆ leaves its factor out.
 *
 * The digital filter maps each analogue second-order section by the
 * bilinear transform, pre-warped so that the section matches the analogue
 * one exactly at its own frequency (f₁, f₂, f₄ and √(f₅f₆)). Below 4× the
 * upper band limit f₂ the warping spoils the band, so such rates are
 * refused ({@linkcode leastRate}); from there the magnitude stays within
 * 1 dB of the analytic one over the nominal range (ISO 8041-1's tolerance
 * there, from memory: about +12 %/−11 %), and {@linkcode worstDeviationDb}
 * says how close it is at a given rate. At the band limits themselves the
 * warping leaves up to 2.1 dB (at f₂, rate 4·f₂).
 *
 * @module
 */
import type { Biquad, Complex } from "../acoustics/biquad.ts";
import { cascadeResponse } from "../acoustics/biquad.ts";

/**
 * The weightings, whole body (ISO 2631-1) then hand-arm (ISO 5349-1).
 *
 * @example
 * ```ts
 * import { VIBRATION_WEIGHTINGS } from "./vibration_weighting.ts";
 * if (VIBRATION_WEIGHTINGS.join() !== "wk,wd,wf,wc,we,wj,wh") throw new Error();
 * ```
 */
export const VIBRATION_WEIGHTINGS = ["wk", "wd", "wf", "wc", "we", "wj", "wh"] as const;

/** One of {@linkcode VIBRATION_WEIGHTINGS}. */
export type VibrationWeighting = typeof VIBRATION_WEIGHTINGS[number];

/** The parameters of one weighting (frequencies in Hz; `Infinity` leaves a factor out). */
export interface WeightingParameters {
  /** High-pass band limit f₁. */
  readonly f1: number;
  /** Low-pass band limit f₂ (the band's upper limit). */
  readonly f2: number;
  /** Quality factor of both band limiting filters. */
  readonly qBand: number;
  /** Acceleration–velocity transition: the zero f₃, the pole pair f₄ with Q₄. */
  readonly f3: number;
  readonly f4: number;
  readonly q4: number;
  /** Upward step: the zero pair f₅ with Q₅, the pole pair f₆ with Q₆. */
  readonly f5: number;
  readonly q5: number;
  readonly f6: number;
  readonly q6: number;
  /** Gain K. */
  readonly k: number;
}

const BUTTERWORTH_Q = Math.SQRT1_2;
const NONE = Infinity;

/**
 * The parameters of each weighting. ISO 2631-1:1997 Annex A, Table A.2 for
 * Wk…Wj; ISO 5349-1:2001 Annex A, Table A.1 (also ISO 8041-1) for Wh.
 */
export const WEIGHTING_PARAMETERS: Readonly<Record<VibrationWeighting, WeightingParameters>> = {
  // from memory: ISO 2631-1:1997 Table A.2, Wk (vertical, seat and feet).
  wk: {
    f1: 0.4,
    f2: 100,
    qBand: BUTTERWORTH_Q,
    f3: 12.5,
    f4: 12.5,
    q4: 0.63,
    f5: 2.37,
    q5: 0.91,
    f6: 3.35,
    q6: 0.91,
    k: 1,
  },
  // from memory: ISO 2631-1:1997 Table A.2, Wd (horizontal).
  wd: {
    f1: 0.4,
    f2: 100,
    qBand: BUTTERWORTH_Q,
    f3: 2.0,
    f4: 2.0,
    q4: 0.63,
    f5: NONE,
    q5: 1,
    f6: NONE,
    q6: 1,
    k: 1,
  },
  // from memory: ISO 2631-1:1997 Table A.2, Wf (motion sickness).
  wf: {
    f1: 0.08,
    f2: 0.63,
    qBand: BUTTERWORTH_Q,
    f3: NONE,
    f4: 0.25,
    q4: 0.86,
    f5: 0.0625,
    q5: 0.80,
    f6: 0.1,
    q6: 0.80,
    k: 1,
  },
  // from memory: ISO 2631-1:1997 Table A.2, Wc (seat-back, x).
  wc: {
    f1: 0.4,
    f2: 100,
    qBand: BUTTERWORTH_Q,
    f3: 8.0,
    f4: 8.0,
    q4: 0.63,
    f5: NONE,
    q5: 1,
    f6: NONE,
    q6: 1,
    k: 1,
  },
  // from memory: ISO 2631-1:1997 Table A.2, We (rotation).
  we: {
    f1: 0.4,
    f2: 100,
    qBand: BUTTERWORTH_Q,
    f3: 1.0,
    f4: 1.0,
    q4: 0.63,
    f5: NONE,
    q5: 1,
    f6: NONE,
    q6: 1,
    k: 1,
  },
  // from memory: ISO 2631-1:1997 Table A.2, Wj (head, recumbent).
  wj: {
    f1: 0.4,
    f2: 100,
    qBand: BUTTERWORTH_Q,
    f3: NONE,
    f4: NONE,
    q4: 1,
    f5: 3.75,
    q5: 0.91,
    f6: 5.32,
    q6: 0.91,
    k: 1,
  },
  // from memory: ISO 5349-1:2001 Table A.1 / ISO 8041-1, Wh (hand-arm): f₁ = 10^0.8,
  // f₂ = 10^3.1, f₃ = f₄ = 100/(2π).
  wh: {
    f1: 6.310,
    f2: 1258.9,
    qBand: BUTTERWORTH_Q,
    f3: 15.915,
    f4: 15.915,
    q4: 0.64,
    f5: NONE,
    q5: 1,
    f6: NONE,
    q6: 1,
    k: 1,
  },
};

/** An analogue second-order section (b2·s² + b1·s + b0)/(a2·s² + a1·s + a0), s in rad/s. */
export interface AnalogSection {
  readonly b: readonly [number, number, number];
  readonly a: readonly [number, number, number];
  /** The frequency (Hz) where its bilinear map is pre-warped to match exactly. */
  readonly warpHz: number;
}

/**
 * The analogue sections of a weighting, gain K in the first: coefficients
 * highest power first, as scipy.signal takes them.
 *
 * @example
 * ```ts
 * import { analogSections } from "./vibration_weighting.ts";
 * // Wd: band high-pass, band low-pass, transition (no upward step).
 * if (analogSections("wd").length !== 3) throw new Error();
 * ```
 */
export function analogSections(weighting: VibrationWeighting): AnalogSection[] {
  const p = WEIGHTING_PARAMETERS[weighting];
  const w = (f: number) => 2 * Math.PI * f;
  const w1 = w(p.f1), w2 = w(p.f2);
  const sections: AnalogSection[] = [
    { b: [p.k, 0, 0], a: [1, w1 / p.qBand, w1 * w1], warpHz: p.f1 },
    { b: [0, 0, w2 * w2], a: [1, w2 / p.qBand, w2 * w2], warpHz: p.f2 },
  ];
  if (Number.isFinite(p.f4)) {
    const w3 = w(p.f3), w4 = w(p.f4);
    // (1 + s/ω₃)/(1 + s/(Q₄ω₄) + s²/ω₄²), multiplied through by ω₄².
    const b: [number, number, number] = Number.isFinite(p.f3)
      ? [0, w4 * w4 / w3, w4 * w4]
      : [0, 0, w4 * w4];
    sections.push({ b, a: [1, w4 / p.q4, w4 * w4], warpHz: p.f4 });
  }
  if (Number.isFinite(p.f5)) {
    const w5 = w(p.f5), w6 = w(p.f6);
    // Multiplied through by ω₆²; the factor (ω₅/ω₆)² turns ω₆²/ω₅² into 1.
    sections.push({
      b: [1, w5 / p.q5, w5 * w5],
      a: [1, w6 / p.q6, w6 * w6],
      warpHz: Math.sqrt(p.f5 * p.f6),
    });
  }
  return sections;
}

/**
 * The analytic complex response of a weighting at `frequency` Hz
 * (ISO 2631-1 Annex A, ISO 5349-1 Annex A).
 *
 * @example
 * ```ts
 * import { analyticResponse } from "./vibration_weighting.ts";
 * // Wd at 1 Hz: 1.011 in ISO 2631-1 Table 3 (from memory).
 * const h = analyticResponse("wd", 1);
 * if (Math.abs(Math.hypot(h.re, h.im) - 1.011) > 0.002) throw new Error();
 * ```
 */
export function analyticResponse(weighting: VibrationWeighting, frequency: number): Complex {
  const s = 2 * Math.PI * frequency; // s = j·s
  let re = 1, im = 0;
  for (const { b, a } of analogSections(weighting)) {
    // b2·(js)² + b1·js + b0 = (b0 − b2·s²) + j·b1·s.
    const nr = b[2] - b[0] * s * s, ni = b[1] * s;
    const dr = a[2] - a[0] * s * s, di = a[1] * s;
    const d = dr * dr + di * di;
    const hr = (nr * dr + ni * di) / d, hi = (ni * dr - nr * di) / d;
    [re, im] = [re * hr - im * hi, re * hi + im * hr];
  }
  return { re, im };
}

/**
 * The least sample rate the digital weighting accepts: 4× the band's upper
 * limit f₂, and 8× for Wf, whose 1/f² slope above f₄ (no f₃) doubles the
 * bilinear warping's error: at 4× it is 1.5 dB low at 0.5 Hz.
 *
 * @example
 * ```ts
 * import { leastRate } from "./vibration_weighting.ts";
 * if (leastRate("wk") !== 400) throw new Error();
 * ```
 */
export function leastRate(weighting: VibrationWeighting): number {
  return (weighting === "wf" ? 8 : 4) * WEIGHTING_PARAMETERS[weighting].f2;
}

/**
 * One analogue section mapped by the bilinear transform
 * s = c·(1 − z⁻¹)/(1 + z⁻¹), c = ω/tan(ω/(2·rate)) for the section's
 * pre-warp frequency ω (what scipy.signal.bilinear does with
 * `fs = c/2`).
 */
export function bilinearSection(section: AnalogSection, rate: number): Biquad {
  const w = 2 * Math.PI * section.warpHz;
  const c = w / Math.tan(w / (2 * rate));
  const c2 = c * c;
  const [b2, b1, b0] = section.b;
  const [a2, a1, a0] = section.a;
  const n0 = b2 * c2 + b1 * c + b0, n1 = 2 * (b0 - b2 * c2), n2 = b2 * c2 - b1 * c + b0;
  const d0 = a2 * c2 + a1 * c + a0, d1 = 2 * (a0 - a2 * c2), d2 = a2 * c2 - a1 * c + a0;
  return { b0: n0 / d0, b1: n1 / d0, b2: n2 / d0, a1: d1 / d0, a2: d2 / d0 };
}

/**
 * The digital filter of a weighting for sample rate `rate`: second-order
 * sections for lib/acoustics/biquad.ts's CascadeFilter.
 *
 * @throws {RangeError} for a rate below {@linkcode leastRate}, naming it.
 *
 * @example
 * ```ts
 * import { weightingSections } from "./vibration_weighting.ts";
 * import { cascadeResponse } from "../acoustics/biquad.ts";
 * const h = cascadeResponse(weightingSections("wk", 1000), 6.3, 1000);
 * if (Math.abs(Math.hypot(h.re, h.im) - 1.054) > 0.01) throw new Error();
 * let said = "";
 * try { weightingSections("wh", 2000); } catch (e) { said = (e as Error).message; }
 * if (!said.includes("at least 5035.6 Hz")) throw new Error(said);
 * ```
 */
export function weightingSections(weighting: VibrationWeighting, rate: number): Biquad[] {
  const least = leastRate(weighting);
  if (!(rate >= least)) {
    throw new RangeError(
      `weighting ${weighting} needs a sample rate of at least ${least} Hz ` +
        `(${least / WEIGHTING_PARAMETERS[weighting].f2} × its upper band limit of ` +
        `${WEIGHTING_PARAMETERS[weighting].f2} Hz); ` +
        `the recording's is ${rate} Hz`,
    );
  }
  return analogSections(weighting).map((s) => bilinearSection(s, rate));
}

/**
 * The one-third-octave frequencies (10^(n/10) Hz) of a weighting's nominal
 * range: from one third octave above f₁ to one below f₂ (0.5–80 Hz for Wk,
 * 8–1000 Hz for Wh, 0.1–0.5 Hz for Wf).
 *
 * @example
 * ```ts
 * import { nominalFrequencies } from "./vibration_weighting.ts";
 * const f = nominalFrequencies("wk");
 * if (f.length !== 23 || Math.abs(f[0] - 0.501) > 1e-3 || Math.abs(f[22] - 79.4) > 0.1) throw new Error();
 * ```
 */
export function nominalFrequencies(weighting: VibrationWeighting): number[] {
  const { f1, f2 } = WEIGHTING_PARAMETERS[weighting];
  const out: number[] = [];
  const first = Math.round(10 * Math.log10(f1)) + 1, last = Math.round(10 * Math.log10(f2)) - 1;
  for (let n = first; n <= last; n++) out.push(10 ** (n / 10));
  return out;
}

/**
 * The worst magnitude deviation (dB) of the digital weighting from the
 * analytic one at the one-third-octave frequencies of its nominal range
 * ({@linkcode nominalFrequencies}), for sample rate `rate`.
 *
 * @example
 * ```ts
 * import { worstDeviationDb } from "./vibration_weighting.ts";
 * if (!(Math.abs(worstDeviationDb("wk", 400)) < 1)) throw new Error();
 * ```
 */
export function worstDeviationDb(weighting: VibrationWeighting, rate: number): number {
  const sections = weightingSections(weighting, rate);
  let worst = 0;
  for (const f of nominalFrequencies(weighting)) {
    const d = cascadeResponse(sections, f, rate), a = analyticResponse(weighting, f);
    const db = 20 * Math.log10(Math.hypot(d.re, d.im) / Math.hypot(a.re, a.im));
    if (Math.abs(db) > Math.abs(worst)) worst = db;
  }
  return worst;
}
