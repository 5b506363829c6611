/** Test signals for the loudness tests: tones and band-limited noise at a sound pressure level. */
import { gaussianNoise } from "../helpers/random.ts";
import FFT from "fft.js";

/** r.m.s. sound pressure, Pa, of a level in dB re 20 µPa (ISO 1683). */
export const pressureOf = (db: number) => 20e-6 * 10 ** (db / 20);

/** Tones (frequency, dB SPL each) of `seconds` at `rate`. */
export function tones(rate: number, seconds: number, parts: readonly [number, number][]) {
  const n = Math.round(rate * seconds);
  const x = new Float64Array(n);
  for (const [f, db] of parts) {
    const a = Math.SQRT2 * pressureOf(db);
    for (let i = 0; i < n; i++) x[i] += a * Math.sin(2 * Math.PI * f * i / rate);
  }
  return x;
}

/**
 * Gaussian noise with a flat spectrum from `lowHz` to `highHz` and none
 * elsewhere (zeroed lines of one long FFT), scaled to `db` SPL overall.
 */
export function bandNoise(
  rate: number,
  seconds: number,
  lowHz: number,
  highHz: number,
  db: number,
  seed = 7,
): Float64Array {
  const n = 2 ** Math.ceil(Math.log2(rate * seconds));
  const fft = new FFT(n);
  const input = fft.toComplexArray(Array.from(gaussianNoise(seed, n)), undefined);
  const spectrum = fft.createComplexArray();
  fft.transform(spectrum, input);
  for (let k = 0; k < n; k++) {
    const f = (k <= n / 2 ? k : n - k) * rate / n;
    if (f < lowHz || f > highHz) spectrum[2 * k] = spectrum[2 * k + 1] = 0;
  }
  const out = fft.createComplexArray();
  fft.inverseTransform(out, spectrum);
  const x = new Float64Array(Math.round(rate * seconds));
  for (let i = 0; i < x.length; i++) x[i] = out[2 * i];
  let s = 0;
  for (const v of x) s += v * v;
  const scale = pressureOf(db) / Math.sqrt(s / x.length);
  for (let i = 0; i < x.length; i++) x[i] *= scale;
  return x;
}
