/**
 * The two distributions `quiver diff` judges changes with: Fisher's F (the
 * ratio of two independent averaged autospectra, each a scaled chi-square
 * variable) and the standard normal (the log magnitude of an FRF). Written
 * from their definitions: the F distribution through the regularized
 * incomplete beta function, the normal through the regularized incomplete
 * gamma function, each evaluated by its power series or continued fraction
 * (the classic pair of expansions, e.g. Abramowitz & Stegun 26.5.8 and
 * 6.5.29/6.5.31), and quantiles by bisection on the distribution function,
 * which is monotone. Checked against scipy.stats in tests/history/.
 *
 * @module
 */

// Lanczos' approximation, g = 7, nine terms (the widely published set, from memory;
// the tests check the distributions built on it against scipy).
const LANCZOS = [
  0.99999999999980993,
  676.5203681218851,
  -1259.1392167224028,
  771.32342877765313,
  -176.61502916214059,
  12.507343278686905,
  -0.13857109526572012,
  9.9843695780195716e-6,
  1.5056327351493116e-7,
];

/**
 * ln Γ(x) for x > 0 (Lanczos' approximation, relative error near 1e-15).
 *
 * @throws {RangeError} for x not a positive finite number.
 *
 * @example
 * ```ts
 * import { lnGamma } from "./confidence_distributions.ts";
 * if (Math.abs(lnGamma(5) - Math.log(24)) > 1e-12) throw new Error(); // Γ(5) = 4!
 * if (Math.abs(lnGamma(0.5) - 0.5 * Math.log(Math.PI)) > 1e-12) throw new Error(); // Γ(1/2) = √π
 * ```
 */
export function lnGamma(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`lnGamma needs x > 0, got ${x}`);
  // Γ(x) = Γ(x + 1) / x keeps the series in its accurate range.
  if (x < 0.5) return lnGamma(x + 1) - Math.log(x);
  const z = x - 1;
  let sum = LANCZOS[0];
  for (let i = 1; i < LANCZOS.length; i++) sum += LANCZOS[i] / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(sum);
}

const EPS = 1e-16;
const TINY = 1e-300;
const MAX_TERMS = 10_000;

/** The continued fraction of I_x(a, b) (modified Lentz), good for x < (a + 1)/(a + b + 2). */
function betaFraction(x: number, a: number, b: number): number {
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= MAX_TERMS; m++) {
    const m2 = 2 * m;
    // Even step: m(b − m)x / ((a + 2m − 1)(a + 2m)).
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    // Odd step: −(a + m)(a + b + m)x / ((a + 2m)(a + 2m + 1)).
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) return h;
  }
  throw new Error(`incomplete beta did not converge (x ${x}, a ${a}, b ${b})`);
}

/**
 * The regularized incomplete beta function I_x(a, b) = B(x; a, b)/B(a, b).
 *
 * @throws {RangeError} for a or b not positive, or x outside [0, 1].
 *
 * @example
 * ```ts
 * import { regularizedBeta } from "./confidence_distributions.ts";
 * // I_x(1, 1) = x; I_x(2, 1) = x² (analytic).
 * if (Math.abs(regularizedBeta(0.3, 1, 1) - 0.3) > 1e-14) throw new Error();
 * if (Math.abs(regularizedBeta(0.3, 2, 1) - 0.09) > 1e-14) throw new Error();
 * ```
 */
export function regularizedBeta(x: number, a: number, b: number): number {
  if (!(a > 0) || !(b > 0) || !Number.isFinite(a) || !Number.isFinite(b)) {
    throw new RangeError(`regularizedBeta needs a, b > 0, got ${a}, ${b}`);
  }
  if (!(x >= 0 && x <= 1)) throw new RangeError(`regularizedBeta needs 0 ≤ x ≤ 1, got ${x}`);
  if (x === 0 || x === 1) return x;
  const lnFront = lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) +
    b * Math.log1p(-x);
  const front = Math.exp(lnFront);
  // The fraction converges fast below the mean; above it, I_x(a, b) = 1 − I_{1−x}(b, a).
  return x < (a + 1) / (a + b + 2)
    ? (front * betaFraction(x, a, b)) / a
    : 1 - (front * betaFraction(1 - x, b, a)) / b;
}

function checkDof(d1: number, d2: number): void {
  if (!(d1 > 0) || !(d2 > 0) || !Number.isFinite(d1) || !Number.isFinite(d2)) {
    throw new RangeError(`the F distribution needs positive degrees of freedom, got ${d1}, ${d2}`);
  }
}

/**
 * P(F ≤ f) for F with (d1, d2) degrees of freedom:
 * I_{d1 f/(d1 f + d2)}(d1/2, d2/2).
 *
 * @throws {RangeError} for degrees of freedom that are not positive, or f < 0.
 *
 * @example
 * ```ts
 * import { fCdf } from "./confidence_distributions.ts";
 * // F(d, d) is symmetric about 1 in the log: P(F ≤ 1) = 1/2.
 * if (Math.abs(fCdf(1, 30, 30) - 0.5) > 1e-12) throw new Error();
 * ```
 */
export function fCdf(f: number, d1: number, d2: number): number {
  checkDof(d1, d2);
  if (!(f >= 0)) throw new RangeError(`fCdf needs f ≥ 0, got ${f}`);
  if (f === Infinity) return 1;
  return regularizedBeta((d1 * f) / (d1 * f + d2), d1 / 2, d2 / 2);
}

/** Bisection of a monotone increasing function on [lo, hi] to where it reaches p. */
function bisect(cdf: (x: number) => number, p: number, lo: number, hi: number): number {
  for (let i = 0; i < 2000; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break; // adjacent doubles: as close as it gets
    if (cdf(mid) < p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * The p-quantile of F with (d1, d2) degrees of freedom: the f with
 * P(F ≤ f) = p (scipy.stats.f.ppf).
 *
 * @throws {RangeError} for p outside (0, 1) or degrees of freedom that are not positive.
 *
 * @example
 * ```ts
 * import { fCdf, fQuantile } from "./confidence_distributions.ts";
 * const f = fQuantile(0.975, 20, 30);
 * if (Math.abs(fCdf(f, 20, 30) - 0.975) > 1e-12) throw new Error();
 * // F_p(d1, d2) = 1 / F_{1−p}(d2, d1) (the reciprocal of an F variable).
 * if (Math.abs(fQuantile(0.025, 30, 20) - 1 / f) > 1e-10) throw new Error();
 * ```
 */
export function fQuantile(p: number, d1: number, d2: number): number {
  checkDof(d1, d2);
  if (!(p > 0 && p < 1)) throw new RangeError(`fQuantile needs 0 < p < 1, got ${p}`);
  // Solved for x = d1 f/(d1 f + d2) in (0, 1), where I_x(d1/2, d2/2) rises from 0 to 1.
  const x = bisect((v) => regularizedBeta(v, d1 / 2, d2 / 2), p, 0, 1);
  return (d2 * x) / (d1 * (1 - x));
}

/** The regularized lower incomplete gamma function P(a, x), a > 0, x ≥ 0. */
function regularizedGammaP(a: number, x: number): number {
  if (x === 0) return 0;
  const lnFront = a * Math.log(x) - x - lnGamma(a);
  if (x < a + 1) {
    // Series: P = e^{−x} x^a / Γ(a + 1) · Σ x^n / ((a + 1)…(a + n)).
    let term = 1 / a, sum = term;
    for (let n = 1; n <= MAX_TERMS; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * EPS) return sum * Math.exp(lnFront);
    }
    throw new Error(`incomplete gamma series did not converge (a ${a}, x ${x})`);
  }
  // Continued fraction of Q = 1 − P (modified Lentz).
  let b = x + 1 - a, c = 1 / TINY, d = 1 / b, h = d;
  for (let i = 1; i <= MAX_TERMS; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) return 1 - Math.exp(lnFront) * h;
  }
  throw new Error(`incomplete gamma fraction did not converge (a ${a}, x ${x})`);
}

/**
 * The standard normal distribution function Φ(z) = (1 + erf(z/√2))/2, with
 * erf(u) = P(1/2, u²).
 *
 * @example
 * ```ts
 * import { normalCdf } from "./confidence_distributions.ts";
 * if (normalCdf(0) !== 0.5) throw new Error();
 * if (Math.abs(normalCdf(1) + normalCdf(-1) - 1) > 1e-15) throw new Error(); // symmetry
 * ```
 */
export function normalCdf(z: number): number {
  if (Number.isNaN(z)) throw new RangeError("normalCdf of NaN");
  if (z === 0) return 0.5;
  const half = 0.5 * regularizedGammaP(0.5, (z * z) / 2);
  return z > 0 ? 0.5 + half : 0.5 - half;
}

/**
 * The p-quantile of the standard normal distribution (scipy.stats.norm.ppf).
 *
 * @throws {RangeError} for p outside (0, 1).
 *
 * @example
 * ```ts
 * import { normalQuantile } from "./confidence_distributions.ts";
 * // 1.959964 for 97.5 % (common practice: the two-sided 95 % factor).
 * if (Math.abs(normalQuantile(0.975) - 1.959964) > 1e-6) throw new Error();
 * ```
 */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`normalQuantile needs 0 < p < 1, got ${p}`);
  return bisect(normalCdf, p, -40, 40);
}
