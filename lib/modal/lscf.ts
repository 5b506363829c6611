/**
 * Several FRFs, one set of poles: the least-squares complex frequency-domain
 * estimator (LSCF; Guillaume, Verboven, Vanlanduit, Van der Auweraer &
 * Peeters, "A poly-reference implementation of the least-squares complex
 * frequency-domain estimator", IMAC XXI, 2003; the single-reference form
 * used here is its common-denominator model), then mode shapes by least
 * squares in the frequency domain (LSFD) with upper and lower residuals.
 *
 * Model: every FRF H_o(ω) = N_o(z)/d(z) with z = exp(jωΔt), Δt = 1/(2·f_max),
 * polynomials of order n with real coefficients. The linearised equations
 * N_o(z_f) − H_o(ω_f)·d(z_f) ≈ 0 are reduced to the denominator alone
 * (the reduced normal equations of the paper), solved with the highest
 * coefficient fixed at 1, and the poles are the roots of d: λ = ln(z)/Δt.
 * Frequency f = |λ|/2π, damping ratio ζ = −Re λ/|λ|.
 *
 * Residues: for the chosen poles, each FRF (as receptance) is fitted by
 * Σ_r [R_r/(jω − λ_r) + conj(R_r)/(jω − conj(λ_r))] + U + L/(jω)², U and L complex
 * (upper and lower residuals for modes outside the band), by linear least
 * squares (ml-matrix QR).
 *
 * @module
 */
import { EigenvalueDecomposition, Matrix, solve } from "npm:ml-matrix@6.15.1";
import { QuiverError } from "../errors.ts";

/** A complex number. */
export interface Complex {
  readonly re: number;
  readonly im: number;
}

/** A physical pole. */
export interface Pole {
  /** Natural frequency |λ|/2π, Hz. */
  readonly frequencyHz: number;
  /** Damping ratio −Re λ/|λ|. */
  readonly dampingRatio: number;
  /** λ, rad/s. */
  readonly lambda: Complex;
}

/** FRFs on one frequency axis, complex, as receptance. */
export interface FrfSet {
  /** Frequencies, Hz, increasing. */
  readonly frequencies: Float64Array;
  /** Per response (degree of freedom): real and imaginary parts. */
  readonly responses: readonly { re: Float64Array; im: Float64Array }[];
}

/**
 * The physical poles of an LSCF model of order `order` fitted to the FRFs
 * over their whole frequency axis: positive frequency inside the band,
 * 0 < ζ < 1, sorted by frequency.
 *
 * @throws {RangeError} for an order below 2 or above what the lines support;
 * QuiverError when the normal equations are singular.
 *
 * @example
 * ```ts
 * import { lscfPoles } from "./lscf.ts";
 * // One mode, 50 Hz, ζ = 2 %: H = 1/(ω₀² − ω² + 2jζω₀ω), on 1 … 100 Hz.
 * const f = new Float64Array(400).map((_, i) => 1 + i * 99 / 399);
 * const w0 = 2 * Math.PI * 50;
 * const re = new Float64Array(400), im = new Float64Array(400);
 * f.forEach((hz, i) => { const w = 2 * Math.PI * hz, a = w0 * w0 - w * w, b = 2 * 0.02 * w0 * w, d = a * a + b * b; re[i] = a / d; im[i] = -b / d; });
 * // The z-domain model approaches the continuous one as the order grows: at order 8 it is exact to 1e-6.
 * const [pole] = lscfPoles({ frequencies: f, responses: [{ re, im }] }, 8);
 * if (Math.abs(pole.frequencyHz / 50 - 1) > 1e-6 || Math.abs(pole.dampingRatio / 0.02 - 1) > 1e-5) throw new Error();
 * ```
 */
export function lscfPoles(frfs: FrfSet, order: number): Pole[] {
  const f = frfs.frequencies;
  const lines = f.length;
  if (!Number.isInteger(order) || order < 2) {
    throw new RangeError(`the model order must be an integer of at least 2, got ${order}`);
  }
  if (lines < order + 2) {
    throw new RangeError(
      `order ${order} needs more than ${order + 1} lines, the band has ${lines}`,
    );
  }
  const fMax = f[lines - 1];
  const dt = 1 / (2 * fMax);
  const n1 = order + 1;
  // Basis z_f^r = exp(j·r·ω_f·Δt), one row per line.
  const baseRe = new Float64Array(lines * n1), baseIm = new Float64Array(lines * n1);
  for (let k = 0; k < lines; k++) {
    const phase = 2 * Math.PI * f[k] * dt;
    for (let r = 0; r < n1; r++) {
      baseRe[k * n1 + r] = Math.cos(r * phase);
      baseIm[k * n1 + r] = Math.sin(r * phase);
    }
  }
  // R = Re(ΓᴴΓ) is the same for every response (unit weights): Σ_f cos((s − r)·φ_f).
  const R = new Matrix(n1, n1);
  for (let r = 0; r < n1; r++) {
    for (let s = 0; s < n1; s++) {
      let sum = 0;
      for (let k = 0; k < lines; k++) {
        sum += baseRe[k * n1 + r] * baseRe[k * n1 + s] + baseIm[k * n1 + r] * baseIm[k * n1 + s];
      }
      R.set(r, s, sum);
    }
  }
  const Rinv = solve(R, Matrix.eye(n1));
  const M = new Matrix(n1, n1);
  for (const h of frfs.responses) {
    // Φ = −H·Γ: S = Re(ΓᴴΦ), T = Re(ΦᴴΦ).
    const S = new Matrix(n1, n1), T = new Matrix(n1, n1);
    for (let r = 0; r < n1; r++) {
      for (let s = 0; s < n1; s++) {
        let sum = 0, tsum = 0;
        for (let k = 0; k < lines; k++) {
          const gr = baseRe[k * n1 + r], gi = baseIm[k * n1 + r];
          const qr = baseRe[k * n1 + s], qi = baseIm[k * n1 + s];
          // Φ_fs = −H_f·z_f^s
          const pr = -(h.re[k] * qr - h.im[k] * qi), pi = -(h.re[k] * qi + h.im[k] * qr);
          sum += gr * pr + gi * pi; // Re(conj(Γ_fr)·Φ_fs)
          const mag2 = h.re[k] * h.re[k] + h.im[k] * h.im[k];
          tsum += mag2 * (gr * qr + gi * qi); // Re(conj(Φ_fr)·Φ_fs) = |H|²·Re(conj(z^r)z^s)
        }
        S.set(r, s, sum);
        T.set(r, s, tsum);
      }
    }
    M.add(T.sub(S.transpose().mmul(Rinv).mmul(S)));
  }
  // α_n = 1: M[0:n, 0:n]·α[0:n] = −M[0:n, n].
  const A = M.subMatrix(0, order - 1, 0, order - 1);
  const b = M.subMatrix(0, order - 1, order, order).mul(-1);
  let alpha: Matrix;
  try {
    alpha = solve(A, b);
  } catch (error) {
    throw new QuiverError(
      `the LSCF normal equations of order ${order} are singular: ${(error as Error).message}`,
    );
  }
  // Companion matrix of d(z) = Σ α_r z^r, α_n = 1.
  const C = new Matrix(order, order);
  for (let r = 0; r < order; r++) C.set(0, r, -alpha.get(order - 1 - r, 0));
  for (let r = 1; r < order; r++) C.set(r, r - 1, 1);
  const eig = new EigenvalueDecomposition(C, { assumeSymmetric: false });
  const poles: Pole[] = [];
  eig.realEigenvalues.forEach((zr, i) => {
    const zi = eig.imaginaryEigenvalues[i];
    // λ = ln(z)/Δt
    const lre = Math.log(Math.hypot(zr, zi)) / dt;
    const lim = Math.atan2(zi, zr) / dt;
    if (!(lim > 0)) return;
    const wn = Math.hypot(lre, lim);
    const zeta = -lre / wn;
    const hz = wn / (2 * Math.PI);
    if (zeta > 0 && zeta < 1 && hz >= f[0] && hz <= fMax) {
      poles.push({ frequencyHz: hz, dampingRatio: zeta, lambda: { re: lre, im: lim } });
    }
  });
  return poles.sort((a, b) => a.frequencyHz - b.frequencyHz);
}

/** Residues of the poles and the residual terms, per response, and the fit's quality. */
export interface ResidueFit {
  /** residues[o][r]: response o, pole r. */
  readonly residues: readonly (readonly Complex[])[];
  /** The synthesised FRFs, per response. */
  readonly synthesis: readonly { re: Float64Array; im: Float64Array }[];
  /** Per response: ‖H − Ĥ‖ / ‖H‖ over the band. */
  readonly relativeError: Float64Array;
}

/**
 * Residues of the given poles in every FRF by linear least squares, with a
 * complex upper residual U and lower residual L/(jω)² per FRF.
 *
 * @throws {QuiverError} when the least-squares problem is singular.
 *
 * @example
 * ```ts
 * import { fitResidues } from "./lscf.ts";
 * const f = new Float64Array(300).map((_, i) => 10 + i * 0.3);
 * const lambda = { re: -2 * Math.PI * 50 * 0.02, im: 2 * Math.PI * 50 * Math.sqrt(1 - 0.0004) };
 * const R = { re: 0, im: -1 / (2 * lambda.im) }; // a unit-mass mode: R = 1/(2jω_d)
 * const h = (w: number, sign: 1 | -1) => { const dr = -lambda.re, di = w - sign * lambda.im; const d = dr * dr + di * di; return { re: dr / d, im: -di / d }; };
 * const re = new Float64Array(300), im = new Float64Array(300);
 * f.forEach((hz, i) => { const w = 2 * Math.PI * hz, a = h(w, 1), c = h(w, -1);
 *   re[i] = R.re * a.re - R.im * a.im + R.re * c.re + R.im * c.im; im[i] = R.re * a.im + R.im * a.re + R.re * c.im - R.im * c.re; });
 * const fit = fitResidues({ frequencies: f, responses: [{ re, im }] }, [{ frequencyHz: 50, dampingRatio: 0.02, lambda }]);
 * if (Math.abs(fit.residues[0][0].im - R.im) > 1e-9 * Math.abs(R.im)) throw new Error();
 * ```
 */
export function fitResidues(frfs: FrfSet, poles: readonly Pole[]): ResidueFit {
  const f = frfs.frequencies;
  const lines = f.length;
  const unknowns = 2 * poles.length + 4; // (a, b) per pole; U and L complex
  const A = new Matrix(2 * lines, unknowns);
  for (let k = 0; k < lines; k++) {
    const w = 2 * Math.PI * f[k];
    poles.forEach((p, r) => {
      // 1/(jω − λ) and 1/(jω − λ*)
      const d1r = -p.lambda.re, d1i = w - p.lambda.im, n1 = d1r * d1r + d1i * d1i;
      const d2r = -p.lambda.re, d2i = w + p.lambda.im, n2 = d2r * d2r + d2i * d2i;
      const g1r = d1r / n1, g1i = -d1i / n1, g2r = d2r / n2, g2i = -d2i / n2;
      // R = a + jb: a·(g1 + g2) + b·(j·g1 − j·g2)
      A.set(2 * k, 2 * r, g1r + g2r);
      A.set(2 * k + 1, 2 * r, g1i + g2i);
      A.set(2 * k, 2 * r + 1, -g1i + g2i);
      A.set(2 * k + 1, 2 * r + 1, g1r - g2r);
    });
    const c = 2 * poles.length;
    // U = u + jv; L/(jω)² = −L/ω²
    A.set(2 * k, c, 1);
    A.set(2 * k + 1, c + 1, 1);
    A.set(2 * k, c + 2, -1 / (w * w));
    A.set(2 * k + 1, c + 3, -1 / (w * w));
  }
  const residues: Complex[][] = [];
  const synthesis: { re: Float64Array; im: Float64Array }[] = [];
  const relativeError = new Float64Array(frfs.responses.length);
  frfs.responses.forEach((h, o) => {
    const b = new Matrix(2 * lines, 1);
    for (let k = 0; k < lines; k++) {
      b.set(2 * k, 0, h.re[k]);
      b.set(2 * k + 1, 0, h.im[k]);
    }
    let x: Matrix;
    try {
      x = solve(A, b);
    } catch (error) {
      throw new QuiverError(`the residue fit is singular: ${(error as Error).message}`);
    }
    residues.push(poles.map((_, r) => ({ re: x.get(2 * r, 0), im: x.get(2 * r + 1, 0) })));
    const fitted = A.mmul(x);
    const re = new Float64Array(lines), im = new Float64Array(lines);
    let err = 0, norm = 0;
    for (let k = 0; k < lines; k++) {
      re[k] = fitted.get(2 * k, 0);
      im[k] = fitted.get(2 * k + 1, 0);
      err += (re[k] - h.re[k]) ** 2 + (im[k] - h.im[k]) ** 2;
      norm += h.re[k] ** 2 + h.im[k] ** 2;
    }
    synthesis.push({ re, im });
    relativeError[o] = Math.sqrt(err / norm);
  });
  return { residues, synthesis, relativeError };
}

/**
 * Modal phase collinearity of a shape (Pappa, Elliott & Schenk 1993, from
 * memory): 1 for a shape whose components share one phase (real normal
 * modes), lower for a complex one. From the 2 × 2 matrix of sums of Re·Re,
 * Re·Im, Im·Im: (λ₁ − λ₂)²/(λ₁ + λ₂)² of its eigenvalues.
 *
 * @example
 * ```ts
 * import { modalPhaseCollinearity } from "./lscf.ts";
 * if (Math.abs(modalPhaseCollinearity([{ re: 1, im: 1 }, { re: -2, im: -2 }]) - 1) > 1e-12) throw new Error();
 * if (modalPhaseCollinearity([{ re: 1, im: 0 }, { re: 0, im: 1 }]) !== 0) throw new Error();
 * ```
 */
export function modalPhaseCollinearity(shape: readonly Complex[]): number {
  let sxx = 0, syy = 0, sxy = 0;
  for (const c of shape) {
    sxx += c.re * c.re;
    syy += c.im * c.im;
    sxy += c.re * c.im;
  }
  const trace = sxx + syy;
  if (!(trace > 0)) return 0;
  // (λ₁ − λ₂)² = (sxx − syy)² + 4·sxy²
  return ((sxx - syy) ** 2 + 4 * sxy * sxy) / (trace * trace);
}
