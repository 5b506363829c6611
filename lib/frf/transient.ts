/**
 * Transient excitation (burst random, impacts) in an FRF's input, found while
 * the record streams past, and the segmenting that suits it.
 *
 * Why: a burst-random or impact force is zero between events. Cut into
 * Hann-windowed, overlapping blocks, the response's decay is tapered by the
 * window (it reads as extra damping: peaks low, damping high) and blocks that
 * cut through a burst leak. A rectangular window on blocks of one burst
 * period, without overlap and starting in the quiet before a burst, holds
 * each burst and its decay whole, and the FRF is then free of leakage
 * (common practice for burst random; Brandt, Noise and Vibration Analysis,
 * 2011, from memory).
 *
 * The rule: the input is cut into frames of {@linkcode frameSamples} samples;
 * a frame is **quiet** when its RMS about the record's mean is below
 * {@linkcode QUIET_LEVEL} (−20 dB) of the whole record's RMS. The input is
 * **transient** when at least {@linkcode TRANSIENT_QUIET_SHARE} of the frames
 * are quiet (stationary random or a sweep has none: their frame RMS stays
 * near the record's). A loud frame after a quiet one is an **onset**; with at
 * least three onsets whose spacings agree within one frame plus 1 %, the
 * excitation is **periodic** and its period is the least-squares slope of
 * onset position against onset number, rounded to a sample.
 *
 * Memory: two numbers per frame; frames grow with the record so that there
 * are at most 2^20 of them.
 *
 * @module
 */
import { medianOf } from "../extent.ts";
import { formatNumber } from "../format_number.ts";

/** A frame is quiet below this fraction of the record's RMS (−20 dB). */
export const QUIET_LEVEL = 0.1;
/** The input is transient when at least this share of its frames is quiet. */
export const TRANSIENT_QUIET_SHARE = 0.1;
const MAX_FRAMES = 2 ** 20;

/**
 * Samples per frame for a record of `length` samples: 16, or more so that
 * there are at most 2^20 frames.
 *
 * @example
 * ```ts
 * import { frameSamples } from "./transient.ts";
 * if (frameSamples(1000) !== 16 || frameSamples(2 ** 26) !== 64) throw new Error();
 * ```
 */
export function frameSamples(length: number): number {
  return Math.max(16, Math.ceil(length / MAX_FRAMES));
}

/** What the input looked like. */
export interface ExcitationFinding {
  /** Whether the input is transient (see the module's rule). */
  readonly transient: boolean;
  /** Share of quiet frames, 0…1. */
  readonly quietShare: number;
  /** Samples per frame. */
  readonly frameSamples: number;
  /** Burst period in samples, when the onsets are regular. */
  readonly periodSamples?: number;
  /** First sample of the first onset's frame. */
  readonly firstOnsetSample?: number;
  /** Median quiet stretch before an onset, samples. */
  readonly quietSamples?: number;
  /** Number of onsets found. */
  readonly onsets: number;
}

/**
 * Collects the input chunk by chunk and judges it at the end.
 *
 * @example
 * ```ts
 * import { TransientDetector } from "./transient.ts";
 * // 1 s bursts of a tone every 4 s at 1 kHz: quiet 3/4 of the time, period 4000 samples.
 * const x = new Float64Array(40000).map((_, i) => i % 4000 >= 500 && i % 4000 < 1500 ? Math.sin(0.3 * i) : 0);
 * const d = new TransientDetector(x.length);
 * d.push(x.subarray(0, 12345));
 * d.push(x.subarray(12345));
 * const f = d.finish();
 * if (!f.transient || f.periodSamples !== 4000 || Math.abs(f.quietShare - 0.75) > 0.01) throw new Error();
 * ```
 */
export class TransientDetector {
  readonly #frame: number;
  readonly #sum: Float64Array;
  readonly #squares: Float64Array;
  #at = 0;

  /** @param length samples the record will have. */
  constructor(length: number) {
    if (!(Number.isInteger(length) && length >= 0)) {
      throw new RangeError(`a record length must be a whole number >= 0, got ${length}`);
    }
    this.#frame = frameSamples(length);
    const frames = Math.ceil(length / this.#frame);
    this.#sum = new Float64Array(frames);
    this.#squares = new Float64Array(frames);
  }

  /** Adds the next samples of the input. */
  push(samples: Float64Array): void {
    const frame = this.#frame;
    let i = 0;
    while (i < samples.length) {
      // One frame (or the part of it in this chunk) at a time.
      const k = Math.floor(this.#at / frame);
      if (k >= this.#sum.length) {
        throw new RangeError("more samples than the record length given to the detector");
      }
      const end = Math.min(samples.length, i + (k + 1) * frame - this.#at);
      let sum = 0, squares = 0;
      for (let j = i; j < end; j++) {
        sum += samples[j];
        squares += samples[j] * samples[j];
      }
      this.#sum[k] += sum;
      this.#squares[k] += squares;
      this.#at += end - i;
      i = end;
    }
  }

  /** The finding over the samples pushed. */
  finish(): ExcitationFinding {
    const frame = this.#frame;
    const full = Math.floor(this.#at / frame); // a partial last frame is left out
    let total = 0, totalSquares = 0;
    for (let k = 0; k < full; k++) {
      total += this.#sum[k];
      totalSquares += this.#squares[k];
    }
    const n = full * frame;
    const none = { transient: false, quietShare: 0, frameSamples: frame, onsets: 0 };
    if (n === 0) return none;
    const mean = total / n;
    const variance = totalSquares / n - mean * mean;
    if (!(variance > 0)) return none;
    // Frame mean square about the record's mean: Σ(x − μ)² = Σx² − 2μΣx + Fμ².
    const limit = QUIET_LEVEL * QUIET_LEVEL * variance;
    const quiet = new Uint8Array(full);
    let quietCount = 0;
    for (let k = 0; k < full; k++) {
      const ms = (this.#squares[k] - 2 * mean * this.#sum[k] + frame * mean * mean) / frame;
      if (ms < limit) {
        quiet[k] = 1;
        quietCount++;
      }
    }
    const quietShare = quietCount / full;
    const onsets: number[] = [];
    const gaps: number[] = [];
    let run = 0;
    for (let k = 0; k < full; k++) {
      if (quiet[k] === 1) {
        run++;
        continue;
      }
      if (run > 0 && k > 0) {
        onsets.push(k);
        gaps.push(run);
      }
      run = 0;
    }
    const finding = {
      transient: quietShare >= TRANSIENT_QUIET_SHARE,
      quietShare,
      frameSamples: frame,
      onsets: onsets.length,
    };
    if (!finding.transient || onsets.length < 3) return finding;
    const spacings = onsets.slice(1).map((o, j) => o - onsets[j]);
    const median = medianOf(spacings);
    if (!spacings.every((d) => Math.abs(d - median) <= 1 + 0.01 * median)) return finding;
    // Least-squares slope of onset frame against onset number.
    const m = onsets.length;
    const jMean = (m - 1) / 2;
    const oMean = onsets.reduce((a, o) => a + o, 0) / m;
    let sxy = 0, sxx = 0;
    onsets.forEach((o, j) => {
      sxy += (j - jMean) * (o - oMean);
      sxx += (j - jMean) ** 2;
    });
    return {
      ...finding,
      periodSamples: Math.round((sxy / sxx) * frame),
      firstOnsetSample: onsets[0] * frame,
      quietSamples: medianOf(gaps) * frame,
    };
  }
}

/** The segmenting that suits a periodic transient input. */
export interface TransientSegmenting {
  readonly window: "rectangular";
  /** One burst period, samples. */
  readonly block: number;
  readonly overlap: 0;
  /** Where to start, s on the record's time axis: in the quiet just before a burst. */
  readonly startS: number;
}

/**
 * The segmenting that suits `finding` (undefined when it has no period),
 * and whether the segmenting used already suits it, with a warning when not.
 *
 * Suits: a rectangular window, no overlap, a block whose boundaries stay in
 * the quiet stretches over the whole record (|block − period| · blocks ≤ half
 * a quiet stretch) and start in one (the first onset lies at most a quiet
 * stretch after a block boundary). For a transient without a period, a
 * rectangular window without overlap.
 *
 * @example
 * ```ts
 * import { transientAdvice } from "./transient.ts";
 * const finding = { transient: true, quietShare: 0.5, frameSamples: 16, periodSamples: 2048, firstOnsetSample: 320, quietSamples: 1024, onsets: 8 };
 * const a = transientAdvice(finding, { rate: 1024, startTime: 0, length: 16384, block: 4096, overlap: 0.5, window: "hann" });
 * if (a.suggested?.block !== 2048 || a.warning === undefined || !a.warning.includes("--window rectangular")) throw new Error();
 * ```
 */
export function transientAdvice(
  finding: ExcitationFinding,
  used: {
    /** Sample rate, Hz. */
    rate: number;
    /** Time of the first sample analysed, s. */
    startTime: number;
    /** Samples analysed. */
    length: number;
    /** Block, samples. */
    block: number;
    /** Overlap fraction. */
    overlap: number;
    /** Window name. */
    window: string;
  },
): { suggested?: TransientSegmenting; suited: boolean; warning?: string } {
  if (!finding.transient) return { suited: true };
  const share = `${formatNumber(100 * finding.quietShare, 3)} %`;
  const seen = `the force is quiet (below −20 dB re its RMS) over ${share} of the record`;
  const taper = used.window === "rectangular"
    ? ""
    : `a ${used.window} window tapers each decay (it reads as extra damping), and `;
  const bias = `${taper}${used.block}-sample blocks with ${
    formatNumber(100 * used.overlap, 3)
  } % overlap that do not hold whole bursts leak: peaks read low and damping high`;
  const { periodSamples: period, firstOnsetSample: onset, quietSamples: gap } = finding;
  if (period === undefined || onset === undefined || gap === undefined) {
    const suited = used.window === "rectangular" && used.overlap === 0;
    return {
      suited,
      ...(suited ? {} : {
        warning:
          `transient excitation: ${seen}, with no regular period; ${bias}. Use a rectangular window without overlap on blocks that each hold one whole event and its decay (--window rectangular --overlap 0 --block N), or quiver hammer for hammer impacts`,
      }),
    };
  }
  // Start in the quiet before the first burst that leaves room for a margin.
  const margin = Math.max(2 * finding.frameSamples, Math.round(gap / 8));
  let first = onset;
  while (first - margin < 0 && first + period < used.length) first += period;
  const startSample = Math.max(0, first - margin);
  const startS = used.startTime + startSample / used.rate;
  const suggested: TransientSegmenting = {
    window: "rectangular",
    block: period,
    overlap: 0,
    startS,
  };
  const blocks = Math.floor(used.length / used.block);
  const phase = ((onset % used.block) + used.block) % used.block;
  const suited = used.window === "rectangular" && used.overlap === 0 &&
    Math.abs(used.block - period) * blocks <= gap / 2 && phase <= gap;
  const periodText = `${period} samples (${formatNumber(period / used.rate, 6)} s)`;
  return {
    suggested,
    suited,
    ...(suited ? {} : {
      warning:
        `transient excitation (burst random or periodic impacts): ${seen}, in bursts every ${periodText}; ${bias}. Use a rectangular window on blocks of one burst period without overlap, starting in the quiet before a burst: --window rectangular --block ${period} --overlap 0 --start ${
          formatNumber(startS, 9)
        }`,
    }),
  };
}
