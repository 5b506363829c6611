/**
 * A single-degree-of-freedom fit around one peak: the second, independent
 * damping estimate.
 *
 * Model, in the FRF's own form (p = 0 receptance, 1 mobility, 2 accelerance):
 *
 *   H(ω) ≈ A·(iω)^p / (ωₙ² − ω² + 2iζωₙω) + R
 *
 * with a complex modal constant A and a complex constant residual R for the
 * modes outside the band (Ewins, Modal Testing, 2nd ed., sec. 4.3–4.4). For
 * given ωₙ and ζ the model is linear in A and R, which are solved by least
 * squares; ωₙ and ζ are found by Nelder–Mead on log ωₙ and log ζ from the
 * half-power start. Without phase (a magnitude-only table) the fit is of
 * log|H| against log|A·(iω)^p/(…)|, with no residual.
 *
 * @module
 */
import { minimise } from "./nelder_mead.ts";

/** The data of the fit band. */
export interface FitBand {
  /** Frequencies, Hz. */
  readonly frequencies: Float64Array;
  /** Real part (complex fit) — omit for a magnitude-only fit. */
  readonly re?: Float64Array;
  /** Imaginary part (complex fit). */
  readonly im?: Float64Array;
  /** Magnitude (used for the magnitude-only fit). */
  readonly magnitude: Float64Array;
  /** Power p of iω in the model: 0, 1 or 2. */
  readonly power: number;
}

/** A fitted mode. */
export interface SdofFit {
  /** Natural frequency fₙ, Hz. */
  readonly frequencyHz: number;
  /** Damping ratio ζ. */
  readonly dampingRatio: number;
  /** |A|. */
  readonly modalConstant: number;
  /** RMS misfit relative to the RMS of the data in the band. */
  readonly relativeMisfit: number;
  /** Whether phase was used (complex fit). */
  readonly complex: boolean;
}

interface Complex {
  re: number;
  im: number;
}

/** (iω)^p / (ωₙ² − ω² + 2iζωₙω). */
function basis(omega: number, wn: number, zeta: number, power: number): Complex {
  const dr = wn * wn - omega * omega;
  const di = 2 * zeta * wn * omega;
  const d2 = dr * dr + di * di;
  // 1/(dr + i·di) = (dr − i·di)/d2, then times i^p·ω^p.
  let re = dr / d2;
  let im = -di / d2;
  const scale = omega ** power;
  for (let q = 0; q < power; q++) [re, im] = [-im, re];
  return { re: re * scale, im: im * scale };
}

/** Complex least squares for H ≈ A·g + R; returns the squared misfit. */
function complexMisfit(
  { band, re, im, wn, zeta }: {
    band: FitBand;
    re: Float64Array;
    im: Float64Array;
    wn: number;
    zeta: number;
  },
): { cost: number; a: Complex } {
  const { frequencies, power } = band;
  const n = frequencies.length;
  // Normal equations [[Σ|g|², Σḡ], [Σg, n]]·[A, R] = [Σḡh, Σh].
  let gg = 0;
  let sgr = 0, sgi = 0, ghr = 0, ghi = 0, shr = 0, shi = 0;
  const g: Complex[] = [];
  for (let k = 0; k < n; k++) {
    const b = basis(2 * Math.PI * frequencies[k], wn, zeta, power);
    g.push(b);
    const hr = re[k], hi = im[k];
    gg += b.re * b.re + b.im * b.im;
    sgr += b.re;
    sgi += b.im;
    ghr += b.re * hr + b.im * hi; // conj(g)·h
    ghi += b.re * hi - b.im * hr;
    shr += hr;
    shi += hi;
  }
  // Solve by elimination: A = (Σḡh − Σḡ·Σh/n)/(Σ|g|² − |Σg|²/n), R = (Σh − A·Σg)/n.
  const det = gg - (sgr * sgr + sgi * sgi) / n;
  const numRe = ghr - (sgr * shr + sgi * shi) / n; // Σḡ·Σh = conj(Σg)·Σh
  const numIm = ghi - (sgr * shi - sgi * shr) / n;
  const a = { re: numRe / det, im: numIm / det };
  const r = {
    re: (shr - (a.re * sgr - a.im * sgi)) / n,
    im: (shi - (a.re * sgi + a.im * sgr)) / n,
  };
  let cost = 0;
  for (let k = 0; k < n; k++) {
    const mr = a.re * g[k].re - a.im * g[k].im + r.re;
    const mi = a.re * g[k].im + a.im * g[k].re + r.im;
    cost += (re[k] - mr) ** 2 + (im[k] - mi) ** 2;
  }
  return { cost, a };
}

function magnitudeMisfit(band: FitBand, wn: number, zeta: number): { cost: number; a: number } {
  const { frequencies, magnitude, power } = band;
  const n = frequencies.length;
  const logRatio = new Float64Array(n);
  let mean = 0;
  for (let k = 0; k < n; k++) {
    const b = basis(2 * Math.PI * frequencies[k], wn, zeta, power);
    logRatio[k] = Math.log(magnitude[k]) - 0.5 * Math.log(b.re * b.re + b.im * b.im);
    mean += logRatio[k] / n;
  }
  let cost = 0;
  for (let k = 0; k < n; k++) cost += (logRatio[k] - mean) ** 2;
  return { cost, a: Math.exp(mean) };
}

/**
 * Fits one mode to the band, starting from `startHz` and `startDamping`.
 *
 * @throws {RangeError} for a band of fewer than 4 lines or a bad start.
 *
 * @example
 * ```ts
 * import { fitSdof } from "./sdof_fit.ts";
 * const f = new Float64Array(40).map((_, k) => 45 + k * 0.25);
 * const h = Array.from(f, (v) => { const w = 2 * Math.PI * v, wn = 2 * Math.PI * 50.1;
 *   const dr = wn * wn - w * w, di = 2 * 0.01 * wn * w, d = dr * dr + di * di; return [dr / d, -di / d]; });
 * const fit = fitSdof({ frequencies: f, re: new Float64Array(h.map((x) => x[0])),
 *   im: new Float64Array(h.map((x) => x[1])), magnitude: new Float64Array(h.map((x) => Math.hypot(x[0], x[1]))),
 *   power: 0 }, 50, 0.012);
 * if (Math.abs(fit.dampingRatio / 0.01 - 1) > 1e-6 || Math.abs(fit.frequencyHz / 50.1 - 1) > 1e-9) throw new Error();
 * ```
 */
export function fitSdof(band: FitBand, startHz: number, startDamping: number): SdofFit {
  if (band.frequencies.length < 4) {
    throw new RangeError(`an SDOF fit needs at least 4 lines, got ${band.frequencies.length}`);
  }
  if (!(startHz > 0) || !(startDamping > 0)) {
    throw new RangeError("the fit needs a positive start frequency and damping");
  }
  const { re, im } = band;
  const complex = re !== undefined && im !== undefined;
  const solve = (wn: number, zeta: number) =>
    complex ? complexMisfit({ band, re, im, wn, zeta }) : magnitudeMisfit(band, wn, zeta);
  const cost = ([logWn, logZeta]: number[]) => solve(Math.exp(logWn), Math.exp(logZeta)).cost;
  let start = [Math.log(2 * Math.PI * startHz), Math.log(startDamping)];
  let best = minimise(cost, start, { step: [0.01, 0.3] });
  // One restart from the minimum guards against a collapsed simplex.
  start = best.x;
  best = minimise(cost, start, { step: [0.002, 0.05] });
  const wn = Math.exp(best.x[0]);
  const zeta = Math.exp(best.x[1]);
  let dataPower = 0;
  for (let k = 0; k < band.magnitude.length; k++) dataPower += band.magnitude[k] ** 2;
  const { a } = solve(wn, zeta);
  const modalConstant = typeof a === "number" ? a : Math.hypot(a.re, a.im);
  const n = band.frequencies.length;
  const relativeMisfit = complex ? Math.sqrt(best.value / dataPower) : Math.sqrt(best.value / n); // log-magnitude misfit (≈ relative)
  return {
    frequencyHz: wn / (2 * Math.PI),
    dampingRatio: zeta,
    modalConstant,
    relativeMisfit,
    complex,
  };
}
