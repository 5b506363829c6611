/**
 * Small complex Hermitian matrices, as spectral matrices are at one line:
 * their eigen-decomposition (from ml-matrix's symmetric solver on the real
 * embedding), and the products built from it. Matrices are row-major with
 * separate real and imaginary arrays.
 *
 * The real embedding of H = A + jB (A symmetric, B antisymmetric) is the
 * symmetric [[A, −B], [B, A]]: each eigenvalue of H appears twice, and each
 * eigenvector u = a + jb of H appears as [a; b] and [−b; a]. One vector of
 * each pair is kept by complex Gram–Schmidt, which also stays right when H
 * itself has a repeated eigenvalue.
 *
 * @module
 */
import { EigenvalueDecomposition, Matrix } from "npm:ml-matrix@6.15.1";

/** A square complex matrix, row-major. */
export interface ComplexSquare {
  /** Order n. */
  readonly n: number;
  /** Real parts, n·n. */
  readonly re: Float64Array;
  /** Imaginary parts, n·n. */
  readonly im: Float64Array;
}

/** Eigenvalues (largest first) and unit eigenvectors of a Hermitian matrix. */
export interface HermitianEigen {
  /** Eigenvalues, real, in descending order. */
  readonly values: Float64Array;
  /** Eigenvector k in column k: element (i, k) at i·n + k. */
  readonly vectors: ComplexSquare;
}

/**
 * The eigen-decomposition H = V·diag(λ)·Vᴴ of a Hermitian matrix.
 *
 * @example
 * ```ts
 * import { hermitianEigen } from "./hermitian.ts";
 * // [[2, j], [−j, 2]] has eigenvalues 3 and 1.
 * const e = hermitianEigen({ n: 2, re: new Float64Array([2, 0, 0, 2]), im: new Float64Array([0, 1, -1, 0]) });
 * if (Math.abs(e.values[0] - 3) > 1e-12 || Math.abs(e.values[1] - 1) > 1e-12) throw new Error();
 * ```
 */
export function hermitianEigen(h: ComplexSquare): HermitianEigen {
  const { n, re, im } = h;
  const embedded = new Matrix(2 * n, 2 * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      // The mean of (i, j) and conj(j, i): a Hermitian matrix exactly, whatever rounding did.
      const a = (re[i * n + j] + re[j * n + i]) / 2;
      const b = (im[i * n + j] - im[j * n + i]) / 2;
      embedded.set(i, j, a);
      embedded.set(i + n, j + n, a);
      embedded.set(i, j + n, -b);
      embedded.set(i + n, j, b);
    }
  }
  const eig = new EigenvalueDecomposition(embedded, { assumeSymmetric: true });
  const all = eig.realEigenvalues;
  const order = all.map((_, k) => k).sort((p, q) => all[q] - all[p]);
  const vectors = eig.eigenvectorMatrix;
  const values = new Float64Array(n);
  const vre = new Float64Array(n * n), vim = new Float64Array(n * n);
  let kept = 0;
  for (const k of order) {
    if (kept === n) break;
    const ur = new Float64Array(n), ui = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      ur[i] = vectors.get(i, k);
      ui[i] = vectors.get(i + n, k);
    }
    // Remove the parts along the eigenvectors kept so far (complex inner products).
    for (let c = 0; c < kept; c++) {
      let pr = 0, pi = 0; // vᴴu
      for (let i = 0; i < n; i++) {
        const vr = vre[i * n + c], vi = vim[i * n + c];
        pr += vr * ur[i] + vi * ui[i];
        pi += vr * ui[i] - vi * ur[i];
      }
      for (let i = 0; i < n; i++) {
        const vr = vre[i * n + c], vi = vim[i * n + c];
        ur[i] -= pr * vr - pi * vi;
        ui[i] -= pr * vi + pi * vr;
      }
    }
    let norm = 0;
    for (let i = 0; i < n; i++) norm += ur[i] * ur[i] + ui[i] * ui[i];
    norm = Math.sqrt(norm);
    if (norm < 0.5) continue; // the twin of a vector already kept
    for (let i = 0; i < n; i++) {
      vre[i * n + kept] = ur[i] / norm;
      vim[i * n + kept] = ui[i] / norm;
    }
    values[kept] = all[k];
    kept++;
  }
  return { values, vectors: { n, re: vre, im: vim } };
}

/**
 * vₖᴴ·g for every eigenvector k: the components of g along the eigenvectors.
 *
 * @example
 * ```ts
 * import { eigenComponents, hermitianEigen } from "./hermitian.ts";
 * const e = hermitianEigen({ n: 2, re: new Float64Array([3, 0, 0, 1]), im: new Float64Array(4) });
 * const c = eigenComponents(e, new Float64Array([0, 2]), new Float64Array([0, 0]));
 * if (Math.abs(Math.hypot(c.re[1], c.im[1]) - 2) > 1e-12 || Math.abs(c.re[0]) > 1e-12) throw new Error();
 * ```
 */
export function eigenComponents(
  eigen: HermitianEigen,
  gRe: Float64Array,
  gIm: Float64Array,
): { re: Float64Array; im: Float64Array } {
  const { n, re: vre, im: vim } = eigen.vectors;
  const re = new Float64Array(n), im = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let sr = 0, si = 0;
    for (let i = 0; i < n; i++) {
      const vr = vre[i * n + k], vi = vim[i * n + k];
      sr += vr * gRe[i] + vi * gIm[i];
      si += vr * gIm[i] - vi * gRe[i];
    }
    re[k] = sr;
    im[k] = si;
  }
  return { re, im };
}

/**
 * V·diag(f(λ))·c: the vector whose components along the eigenvectors are
 * cₖ·fₖ. With fₖ = 1/λₖ and c = Vᴴg it is H⁻¹·g.
 *
 * @example
 * ```ts
 * import { eigenComponents, fromEigenComponents, hermitianEigen } from "./hermitian.ts";
 * const e = hermitianEigen({ n: 2, re: new Float64Array([4, 0, 0, 2]), im: new Float64Array(4) });
 * const c = eigenComponents(e, new Float64Array([8, 2]), new Float64Array(2));
 * const x = fromEigenComponents(e, c, new Float64Array(e.values.map((v) => 1 / v)));
 * if (Math.abs(x.re[0] - 2) > 1e-12 || Math.abs(x.re[1] - 1) > 1e-12) throw new Error();
 * ```
 */
export function fromEigenComponents(
  eigen: HermitianEigen,
  c: { re: Float64Array; im: Float64Array },
  factors: Float64Array,
): { re: Float64Array; im: Float64Array } {
  const { n, re: vre, im: vim } = eigen.vectors;
  const re = new Float64Array(n), im = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const cr = c.re[k] * factors[k], ci = c.im[k] * factors[k];
    for (let i = 0; i < n; i++) {
      const vr = vre[i * n + k], vi = vim[i * n + k];
      re[i] += vr * cr - vi * ci;
      im[i] += vr * ci + vi * cr;
    }
  }
  return { re, im };
}
