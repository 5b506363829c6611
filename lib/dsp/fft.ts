/**
 * The project's one wrapper around fft.js. A plan is made once per block
 * size, holds every scratch buffer it needs, and is reused for every block.
 *
 * fft.js transforms powers of two only. Other sizes (a `--resolution` that
 * does not divide the rate into a power of two) go through Bluestein's
 * chirp-z algorithm on top of a power-of-two fft.js plan, so every size is
 * exact, just slower.
 *
 * @module
 */
// fft.js as an ES module (vendor/fft.js/README.md): the npm package is CommonJS, whose loader
// cost every start-up about 15 ms of CPU.
import FFT from "./vendor/fft.js/fft.js";

/** A reusable real-input DFT of one fixed size. */
export interface RealFftPlan {
  /** Number of samples per transform. */
  readonly size: number;
  /** Number of one-sided lines, `floor(size / 2) + 1`. */
  readonly lines: number;
  /**
   * Computes X[k] = Σ x[n]·e^(−2πi·k·n/N) for k = 0 … lines − 1 into `re` and
   * `im` (each of length `lines`). Allocates nothing.
   */
  forward(input: Float64Array, re: Float64Array, im: Float64Array): void;
}

/** Strict view of the parts of fft.js this module uses. */
interface FftJs {
  transform(out: Float64Array, data: Float64Array): void;
  inverseTransform(out: Float64Array, data: Float64Array): void;
}
const FftJsConstructor: new (size: number) => FftJs = FFT;

/**
 * True when `n` is a power of two of at least 2.
 *
 * @example
 * ```ts
 * import { isPowerOfTwo } from "./fft.ts";
 * if (!isPowerOfTwo(4096) || isPowerOfTwo(1000)) throw new Error();
 * ```
 */
export function isPowerOfTwo(n: number): boolean {
  // Not `n & (n − 1)`: bitwise operators work on 32 bits, so 2^32 + 2^31 would pass.
  return Number.isSafeInteger(n) && n >= 2 && 2 ** Math.round(Math.log2(n)) === n;
}

/**
 * The largest transform {@linkcode realFftPlan} makes: 2^27 = 134 217 728
 * samples. Bluestein's power-of-two length for it stays at 2^28, within the
 * 32-bit index arithmetic of fft.js; the plan's arrays alone then take several
 * GiB, so the command line checks a block against the machine's memory first.
 */
export const MAX_FFT_SIZE = 2 ** 27;

/**
 * A real DFT of N samples from one complex DFT of N/2 points: the samples, read
 * as N/2 complex numbers z[n] = x[2n] + i·x[2n+1], are already in fft.js's
 * interleaved layout, so they are transformed where they stand; then
 * X[k] = E[k] + W^k·O[k] with E[k] = (Z[k] + Z̄[N/2−k])/2, O[k] = (Z[k] − Z̄[N/2−k])/2i
 * and W = e^(−2πi/N) (Cooley, Lewis & Welch, J. Sound Vib. 12(3), 1970, from memory).
 * About 1.4× the speed of fft.js's own realTransform at the block sizes quiver uses,
 * and the transform is most of a PSD's time.
 */
class PowerOfTwoPlan implements RealFftPlan {
  readonly size: number;
  readonly lines: number;
  readonly #half: FftJs;
  readonly #z: Float64Array;
  readonly #cos: Float64Array;
  readonly #sin: Float64Array;

  constructor(size: number) {
    this.size = size;
    this.lines = size / 2 + 1;
    const half = size / 2;
    this.#half = new FftJsConstructor(half);
    this.#z = new Float64Array(size);
    this.#cos = new Float64Array(half);
    this.#sin = new Float64Array(half);
    for (let k = 0; k < half; k++) {
      this.#cos[k] = Math.cos(2 * Math.PI * k / size);
      this.#sin[k] = -Math.sin(2 * Math.PI * k / size);
    }
  }

  forward(input: Float64Array, re: Float64Array, im: Float64Array): void {
    const z = this.#z;
    const half = this.size / 2;
    this.#half.transform(z, input); // reads the first `size` values only
    re[0] = z[0] + z[1];
    im[0] = 0;
    re[half] = z[0] - z[1];
    im[half] = 0;
    const wr = this.#cos, wi = this.#sin;
    for (let k = 1; k < half; k++) {
      const zr = z[2 * k], zi = z[2 * k + 1];
      const mr = z[2 * (half - k)], mi = z[2 * (half - k) + 1];
      const er = 0.5 * (zr + mr), ei = 0.5 * (zi - mi);
      const or = 0.5 * (zi + mi), oi = -0.5 * (zr - mr);
      re[k] = er + wr[k] * or - wi[k] * oi;
      im[k] = ei + wr[k] * oi + wi[k] * or;
    }
  }
}

/** Bluestein: X[k] = c̄[k] · Σ (x[n]·c̄[n]) · c[k − n], c[n] = e^(iπn²/N). */
class BluesteinPlan implements RealFftPlan {
  readonly size: number;
  readonly lines: number;
  readonly #fft: FftJs;
  readonly #chirpCos: Float64Array;
  readonly #chirpSin: Float64Array;
  readonly #kernel: Float64Array;
  readonly #work: Float64Array;
  readonly #spectrum: Float64Array;

  constructor(size: number) {
    this.size = size;
    this.lines = Math.floor(size / 2) + 1;
    let m = 2;
    while (m < 2 * size - 1) m *= 2;
    this.#fft = new FftJsConstructor(m);
    this.#chirpCos = new Float64Array(size);
    this.#chirpSin = new Float64Array(size);
    for (let n = 0; n < size; n++) {
      // n² mod 2N keeps the phase argument small and exact for large n.
      const phase = Math.PI * ((n * n) % (2 * size)) / size;
      this.#chirpCos[n] = Math.cos(phase);
      this.#chirpSin[n] = Math.sin(phase);
    }
    const kernelTime = new Float64Array(2 * m);
    for (let n = 0; n < size; n++) {
      kernelTime[2 * n] = this.#chirpCos[n];
      kernelTime[2 * n + 1] = this.#chirpSin[n];
      if (n > 0) {
        kernelTime[2 * (m - n)] = this.#chirpCos[n];
        kernelTime[2 * (m - n) + 1] = this.#chirpSin[n];
      }
    }
    this.#kernel = new Float64Array(2 * m);
    this.#fft.transform(this.#kernel, kernelTime);
    this.#work = new Float64Array(2 * m);
    this.#spectrum = new Float64Array(2 * m);
  }

  forward(input: Float64Array, re: Float64Array, im: Float64Array): void {
    const work = this.#work;
    const spectrum = this.#spectrum;
    const cosC = this.#chirpCos;
    const sinC = this.#chirpSin;
    work.fill(0);
    for (let n = 0; n < this.size; n++) {
      work[2 * n] = input[n] * cosC[n];
      work[2 * n + 1] = -input[n] * sinC[n];
    }
    this.#fft.transform(spectrum, work);
    const kernel = this.#kernel;
    for (let i = 0; i < spectrum.length; i += 2) {
      const a = spectrum[i];
      const b = spectrum[i + 1];
      const c = kernel[i];
      const d = kernel[i + 1];
      spectrum[i] = a * c - b * d;
      spectrum[i + 1] = a * d + b * c;
    }
    this.#fft.inverseTransform(work, spectrum);
    for (let k = 0; k < this.lines; k++) {
      const a = work[2 * k];
      const b = work[2 * k + 1];
      re[k] = a * cosC[k] + b * sinC[k];
      im[k] = b * cosC[k] - a * sinC[k];
    }
  }
}

const planCache = new Map<number, RealFftPlan>();

/**
 * Returns the real-input DFT plan for `size` samples, creating it on first
 * use and caching it for the life of the process.
 *
 * @throws {RangeError} when `size` is not an integer from 2 to
 * {@linkcode MAX_FFT_SIZE}.
 *
 * @example
 * ```ts
 * import { realFftPlan } from "./fft.ts";
 * const plan = realFftPlan(8);
 * const re = new Float64Array(plan.lines), im = new Float64Array(plan.lines);
 * plan.forward(new Float64Array([1, 1, 1, 1, 1, 1, 1, 1]), re, im);
 * if (re[0] !== 8 || re[1] !== 0) throw new Error();
 * ```
 */
export function realFftPlan(size: number): RealFftPlan {
  if (!Number.isInteger(size) || size < 2) {
    throw new RangeError(
      `FFT size must be an integer of at least 2, got ${size}`,
    );
  }
  if (size > MAX_FFT_SIZE) {
    throw new RangeError(`FFT size must be at most ${MAX_FFT_SIZE} (2^27) samples, got ${size}`);
  }
  let plan = planCache.get(size);
  if (plan === undefined) {
    plan = isPowerOfTwo(size) && size >= 4 ? new PowerOfTwoPlan(size) : new BluesteinPlan(size);
    planCache.set(size, plan);
  }
  return plan;
}
