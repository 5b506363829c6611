/**
 * FIR filters for synthetic systems whose FRF is known exactly:
 * y[n] = Σ b_k·x[n−k], H(f) = Σ b_k·e^{−j2πfk/fs} (the e^{−jωt} kernel of the FFT).
 */

/** y = Σ b_k·x[n−k], starting at rest. */
export function fir(x: Float64Array, taps: readonly number[]): Float64Array {
  const y = new Float64Array(x.length);
  for (let n = 0; n < x.length; n++) {
    let s = 0;
    for (let k = 0; k < taps.length && k <= n; k++) s += taps[k] * x[n - k];
    y[n] = s;
  }
  return y;
}

/** H(f) of the filter at sample rate `rate`. */
export function firResponse(
  taps: readonly number[],
  f: number,
  rate: number,
): { re: number; im: number } {
  let re = 0, im = 0;
  taps.forEach((b, k) => {
    re += b * Math.cos((2 * Math.PI * f * k) / rate);
    im -= b * Math.sin((2 * Math.PI * f * k) / rate);
  });
  return { re, im };
}

/** Element-wise sum of equal-length arrays. */
export const add = (...xs: Float64Array[]): Float64Array =>
  xs[0].map((_, i) => xs.reduce((s, x) => s + x[i], 0));

/** a·x. */
export const scale = (x: Float64Array, a: number): Float64Array => x.map((v) => a * v);
