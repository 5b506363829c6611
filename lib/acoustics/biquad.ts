/**
 * Second-order IIR sections and cascades of them: the digital filters of the
 * frequency weightings, the band filters and the decimators.
 *
 * @module
 */

/** One section, H(z) = (b0 + b1·z⁻¹ + b2·z⁻²)/(1 + a1·z⁻¹ + a2·z⁻²). */
export interface Biquad {
  readonly b0: number;
  readonly b1: number;
  readonly b2: number;
  readonly a1: number;
  readonly a2: number;
}

/** A complex number. */
export interface Complex {
  readonly re: number;
  readonly im: number;
}

/**
 * A cascade with its state, for filtering a signal chunk by chunk: the
 * chunks come out exactly as the whole signal would.
 *
 * @example
 * ```ts
 * import { CascadeFilter } from "./biquad.ts";
 * // y[n] = 0.5·x[n] + 0.5·x[n−1], fed in two chunks: the state carries over.
 * const f = new CascadeFilter([{ b0: 0.5, b1: 0.5, b2: 0, a1: 0, a2: 0 }]);
 * const a = f.process(new Float64Array([2, 4])), b = f.process(new Float64Array([6]));
 * if (a[0] !== 1 || a[1] !== 3 || b[0] !== 5) throw new Error();
 * ```
 */
export class CascadeFilter {
  readonly #sections: readonly Biquad[];
  readonly #state: Float64Array;

  constructor(sections: readonly Biquad[]) {
    this.#sections = sections;
    this.#state = new Float64Array(2 * sections.length);
  }

  /** Filters `x` in place and returns it. */
  process(x: Float64Array): Float64Array {
    const sections = this.#sections, state = this.#state;
    // Several sections per pass: their recurrences are independent from
    // sample to sample, so the processor overlaps them instead of waiting on
    // one section's feedback (issue #31: four per pass about 2.5× the
    // one-section loop on the Wk cascade, a pair about 1.8×). Same operations
    // in the same order per section as the one-section loop: the same bits.
    let k = 0;
    for (; k + 3 < sections.length; k += 4) filterQuad(sections, k, state, x);
    if (k + 1 < sections.length) {
      filterPair(sections[k], sections[k + 1], state, 2 * k, x);
      k += 2;
    }
    if (k < sections.length) filterOne(sections[k], state, 2 * k, x);
    return x;
  }
}

/**
 * One section over `x` in place (transposed direct form II), its state at
 * `state[at]`, `state[at + 1]`.
 */
function filterOne(q: Biquad, state: Float64Array, at: number, x: Float64Array): void {
  const b0 = q.b0, b1 = q.b1, b2 = q.b2, a1 = q.a1, a2 = q.a2;
  let s1 = state[at], s2 = state[at + 1];
  const n = x.length;
  for (let i = 0; i < n; i++) {
    const input = x[i];
    const output = b0 * input + s1;
    s1 = b1 * input - a1 * output + s2;
    s2 = b2 * input - a2 * output;
    x[i] = output;
  }
  state[at] = s1;
  state[at + 1] = s2;
}

/**
 * Sections `p` then `q` over `x` in place in one pass, each exactly as
 * {@link filterOne} computes it (same operations in the same order, so the
 * same bits); their states at `state[at .. at + 3]`.
 */
function filterPair(p: Biquad, q: Biquad, state: Float64Array, at: number, x: Float64Array): void {
  const pb0 = p.b0, pb1 = p.b1, pb2 = p.b2, pa1 = p.a1, pa2 = p.a2;
  const qb0 = q.b0, qb1 = q.b1, qb2 = q.b2, qa1 = q.a1, qa2 = q.a2;
  let p1 = state[at], p2 = state[at + 1], q1 = state[at + 2], q2 = state[at + 3];
  const n = x.length;
  for (let i = 0; i < n; i++) {
    const input = x[i];
    const middle = pb0 * input + p1;
    p1 = pb1 * input - pa1 * middle + p2;
    p2 = pb2 * input - pa2 * middle;
    const output = qb0 * middle + q1;
    q1 = qb1 * middle - qa1 * output + q2;
    q2 = qb2 * middle - qa2 * output;
    x[i] = output;
  }
  state[at] = p1;
  state[at + 1] = p2;
  state[at + 2] = q1;
  state[at + 3] = q2;
}

/**
 * Sections `k` to `k + 3` over `x` in place in one pass, each exactly as
 * {@link filterOne} computes it; their states at `state[2k .. 2k + 7]`.
 */
function filterQuad(
  sections: readonly Biquad[],
  k: number,
  state: Float64Array,
  x: Float64Array,
): void {
  const p = sections[k], q = sections[k + 1], r = sections[k + 2], s = sections[k + 3];
  const pb0 = p.b0, pb1 = p.b1, pb2 = p.b2, pa1 = p.a1, pa2 = p.a2;
  const qb0 = q.b0, qb1 = q.b1, qb2 = q.b2, qa1 = q.a1, qa2 = q.a2;
  const rb0 = r.b0, rb1 = r.b1, rb2 = r.b2, ra1 = r.a1, ra2 = r.a2;
  const sb0 = s.b0, sb1 = s.b1, sb2 = s.b2, sa1 = s.a1, sa2 = s.a2;
  const at = 2 * k;
  let p1 = state[at], p2 = state[at + 1], q1 = state[at + 2], q2 = state[at + 3];
  let r1 = state[at + 4], r2 = state[at + 5], s1 = state[at + 6], s2 = state[at + 7];
  const n = x.length;
  for (let i = 0; i < n; i++) {
    const input = x[i];
    const u = pb0 * input + p1;
    p1 = pb1 * input - pa1 * u + p2;
    p2 = pb2 * input - pa2 * u;
    const v = qb0 * u + q1;
    q1 = qb1 * u - qa1 * v + q2;
    q2 = qb2 * u - qa2 * v;
    const w = rb0 * v + r1;
    r1 = rb1 * v - ra1 * w + r2;
    r2 = rb2 * v - ra2 * w;
    const output = sb0 * w + s1;
    s1 = sb1 * w - sa1 * output + s2;
    s2 = sb2 * w - sa2 * output;
    x[i] = output;
  }
  state[at] = p1;
  state[at + 1] = p2;
  state[at + 2] = q1;
  state[at + 3] = q2;
  state[at + 4] = r1;
  state[at + 5] = r2;
  state[at + 6] = s1;
  state[at + 7] = s2;
}

/**
 * Filters `x` through the cascade (transposed direct form II), starting at
 * rest. Returns a new array.
 *
 * @example
 * ```ts
 * import { filterCascade } from "./biquad.ts";
 * const y = filterCascade(new Float64Array([1, 0, 0]), [{ b0: 0.5, b1: 0.5, b2: 0, a1: 0, a2: 0 }]);
 * if (y.join() !== "0.5,0.5,0") throw new Error();
 * ```
 */
export function filterCascade(x: Float64Array, sections: readonly Biquad[]): Float64Array {
  return new CascadeFilter(sections).process(x.slice());
}

/**
 * The cascade's complex response at `frequency` Hz for sample rate `rate`.
 *
 * @example
 * ```ts
 * import { cascadeResponse } from "./biquad.ts";
 * const h = cascadeResponse([{ b0: 1, b1: 0, b2: 0, a1: 0, a2: 0 }], 100, 1000);
 * if (h.re !== 1 || h.im !== 0) throw new Error();
 * ```
 */
export function cascadeResponse(
  sections: readonly Biquad[],
  frequency: number,
  rate: number,
): Complex {
  const w = (2 * Math.PI * frequency) / rate;
  const c1 = Math.cos(w), s1 = -Math.sin(w);
  const c2 = Math.cos(2 * w), s2 = -Math.sin(2 * w);
  let re = 1;
  let im = 0;
  for (const q of sections) {
    const nr = q.b0 + q.b1 * c1 + q.b2 * c2;
    const ni = q.b1 * s1 + q.b2 * s2;
    const dr = 1 + q.a1 * c1 + q.a2 * c2;
    const di = q.a1 * s1 + q.a2 * s2;
    const d = dr * dr + di * di;
    const hr = (nr * dr + ni * di) / d;
    const hi = (ni * dr - nr * di) / d;
    [re, im] = [re * hr - im * hi, re * hi + im * hr];
  }
  return { re, im };
}

/**
 * A section from its two zeros and a complex-conjugate (or two real) poles
 * in the z-plane, with gain `gain`.
 */
export function sectionFromRoots(
  zeros: readonly [Complex, Complex],
  poles: readonly [Complex, Complex],
  gain = 1,
): Biquad {
  const sum = (a: Complex, b: Complex) => a.re + b.re;
  const product = (a: Complex, b: Complex) => a.re * b.re - a.im * b.im;
  return {
    b0: gain,
    b1: -gain * sum(zeros[0], zeros[1]),
    b2: gain * product(zeros[0], zeros[1]),
    a1: -sum(poles[0], poles[1]),
    a2: product(poles[0], poles[1]),
  };
}

/** Scales a cascade so that its magnitude at `frequency` is `magnitude`. */
export function normaliseCascade(
  sections: readonly Biquad[],
  frequency: number,
  rate: number,
  magnitude: number,
): Biquad[] {
  const h = cascadeResponse(sections, frequency, rate);
  const k = magnitude / Math.hypot(h.re, h.im);
  return sections.map((s, i) => (i === 0 ? { ...s, b0: s.b0 * k, b1: s.b1 * k, b2: s.b2 * k } : s));
}
