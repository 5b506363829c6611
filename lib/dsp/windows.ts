/**
 * Data windows for spectral analysis, all in the periodic (DFT-even) form
 * w[n] = Σₖ (−1)ᵏ·aₖ·cos(2πkn/N), n = 0 … N−1, scaled to a peak of 1.
 *
 * The gains that amplitude and power corrections need (coherent gain,
 * equivalent noise bandwidth, scallop loss) are computed from the samples by
 * {@linkcode windowGains}, never typed in per call site.
 *
 * @module
 */
import { parseChoice } from "../choices.ts";

/**
 * The windows quiver offers.
 *
 * @example
 * ```ts
 * import { WINDOW_NAMES } from "./windows.ts";
 * if (!WINDOW_NAMES.includes("hann") || !WINDOW_NAMES.includes("flattop")) throw new Error();
 * ```
 */
export const WINDOW_NAMES = [
  "rectangular",
  "hann",
  "hamming",
  "blackman-harris",
  "flattop",
] as const;

/** One of {@linkcode WINDOW_NAMES}. */
export type WindowName = typeof WINDOW_NAMES[number];

/** A cosine-sum window definition with its published source. */
export interface WindowDefinition {
  /** The name used in options and metadata. */
  readonly name: WindowName;
  /** Cosine-sum coefficients a₀, a₁, … (signs alternate in the sum). */
  readonly coefficients: readonly number[];
  /** Where the coefficients are published. */
  readonly source: string;
}

/** Every window's coefficient set and its source. */
export const WINDOW_DEFINITIONS: Readonly<Record<WindowName, WindowDefinition>> = {
  rectangular: {
    name: "rectangular",
    coefficients: [1],
    source: "Harris 1978, section V.A",
  },
  hann: {
    name: "hann",
    coefficients: [0.5, 0.5],
    source: "Harris 1978, section V.C (cos² window)",
  },
  hamming: {
    name: "hamming",
    coefficients: [0.54, 0.46],
    source: "Harris 1978, section V.D",
  },
  "blackman-harris": {
    name: "blackman-harris",
    coefficients: [0.35875, 0.48829, 0.14128, 0.01168],
    source: "Harris 1978, section V.F, 4-term (−92 dB) Blackman-Harris",
  },
  flattop: {
    name: "flattop",
    coefficients: [1, 1.9383379, 1.3045202, 0.402827, 0.0350665],
    source: "Heinzel, Rüdiger & Schilling 2002, appendix D, HFT95 flat-top",
  },
};

/**
 * Narrows a user-supplied string to a {@linkcode WindowName}.
 *
 * @throws {RangeError} for a name that is not a known window.
 *
 * @example
 * ```ts
 * import { parseWindowName } from "./windows.ts";
 * if (parseWindowName("hann") !== "hann") throw new Error();
 * ```
 */
export function parseWindowName(name: string): WindowName {
  return parseChoice(name, WINDOW_NAMES, "window");
}

/**
 * The periodic window of `size` samples, scaled to a peak of 1.
 *
 * @throws {RangeError} for a name that is not one of {@linkcode WINDOW_NAMES}
 * (naming them), or when `size` is not an integer of at least 1.
 *
 * @example
 * ```ts
 * import { windowSamples } from "./windows.ts";
 * const w = windowSamples("hann", 4);
 * if (w[0] !== 0 || Math.abs(w[2] - 1) > 1e-15) throw new Error();
 * ```
 */
export function windowSamples(name: WindowName, size: number): Float64Array {
  // A caller in plain JavaScript (or a cast) can pass any string: say which names exist.
  parseWindowName(name);
  if (!Number.isInteger(size) || size < 1) {
    throw new RangeError(`window size must be a positive integer, got ${size}`);
  }
  const a = WINDOW_DEFINITIONS[name].coefficients;
  // The peak of an alternating cosine sum sits at n = N/2 and equals Σ aₖ.
  const peak = a.reduce((s, v) => s + v, 0);
  const w = new Float64Array(size);
  for (let n = 0; n < size; n++) {
    const z = 2 * Math.PI * n / size;
    let v = 0;
    for (let k = 0; k < a.length; k++) {
      v += (k % 2 === 0 ? 1 : -1) * a[k] * Math.cos(k * z);
    }
    w[n] = v / peak;
  }
  return w;
}

/** The figures of merit of a sampled window (Harris 1978, Table 1). */
export interface WindowGains {
  /** Σw. */
  readonly sum: number;
  /** Σw². */
  readonly sumOfSquares: number;
  /** Coherent gain Σw/N: the amplitude a bin-centred tone keeps. */
  readonly coherentGain: number;
  /** Equivalent noise bandwidth in bins, N·Σw²/(Σw)². */
  readonly enbwBins: number;
  /** Amplitude loss for a tone half-way between lines, in dB (positive). */
  readonly scallopLossDb: number;
}

/**
 * Magnitude of the window's DTFT at `binOffset` bins from its centre,
 * relative to its value at 0 (Harris 1978, eq. 18).
 *
 * @example
 * ```ts
 * import { windowResponse, windowSamples } from "./windows.ts";
 * const w = windowSamples("rectangular", 64);
 * if (Math.abs(windowResponse(w, 1)) > 1e-12) throw new Error();
 * ```
 */
export function windowResponse(w: Float64Array, binOffset: number): number {
  const n = w.length;
  let re = 0;
  let im = 0;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const phase = -2 * Math.PI * binOffset * i / n;
    re += w[i] * Math.cos(phase);
    im += w[i] * Math.sin(phase);
    sum += w[i];
  }
  return Math.hypot(re, im) / sum;
}

/**
 * Coherent gain, ENBW and scallop loss of a sampled window.
 *
 * @example
 * ```ts
 * import { windowGains, windowSamples } from "./windows.ts";
 * const g = windowGains(windowSamples("hann", 1024));
 * if (Math.abs(g.enbwBins - 1.5) > 1e-12) throw new Error();
 * ```
 */
export function windowGains(w: Float64Array): WindowGains {
  let sum = 0;
  let sumOfSquares = 0;
  for (let i = 0; i < w.length; i++) {
    sum += w[i];
    sumOfSquares += w[i] * w[i];
  }
  return {
    sum,
    sumOfSquares,
    coherentGain: sum / w.length,
    enbwBins: w.length * sumOfSquares / (sum * sum),
    scallopLossDb: -20 * Math.log10(windowResponse(w, 0.5)),
  };
}
