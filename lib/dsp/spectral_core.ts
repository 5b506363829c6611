/**
 * The one spectral core. Every spectrum, cross spectrum, FRF and coherence in
 * quiver comes from here:
 *
 *   segment → detrend → window → FFT → |X|², X*·Y → one-sided density scale → average
 *
 * Each channel of a segment is transformed exactly once; all auto spectra and
 * all requested cross spectra are formed from those transforms in the same
 * pass. Data can be pushed in chunks of any length ({@linkcode SpectralAccumulator}),
 * so a long recording never needs to sit in memory whole.
 *
 * Scaling: the core keeps one-sided spectral densities, G(f) in unit²/Hz
 * (for a cross spectrum, unitₓ·unitᵧ/Hz), with Gxy = 2·E[X*·Y]/(fs·Σw²)
 * (Bendat & Piersol, Random Data, 4th ed., eq. 11.101 with the window's
 * power normalisation). {@linkcode scaleFactor} converts to the "spectrum"
 * scaling, unit² per line.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { type RealFftPlan, realFftPlan } from "./fft.ts";
import { detrendInPlace } from "./detrend.ts";
import { windowGains, windowSamples } from "./windows.ts";
import { oneSidedWeights, type SpectralEstimate } from "./spectral_estimate.ts";
import { type ResolvedOptions, resolveOptions, type SpectralOptions } from "./spectral_options.ts";

// The core's options and results live beside it, one concept per file; importers of the
// core find them here as well.
export {
  AVERAGING_MODES,
  type AveragingMode,
  type CrossSpectrum,
  oneSidedWeights,
  scaleFactor,
  type Scaling,
  type SpectralEstimate,
} from "./spectral_estimate.ts";
export {
  blockForResolution,
  DEFAULT_BLOCK,
  MAX_SEGMENTS_PER_BLOCK,
  MIN_BLOCK,
  resolveBlock,
  type SpectralOptions,
  validateSpectralOptions,
} from "./spectral_options.ts";

/**
 * Welch-style averaging of auto and cross spectra over data pushed in
 * chunks. Construct once, {@linkcode SpectralAccumulator.push} every chunk,
 * then {@linkcode SpectralAccumulator.finish}.
 *
 * @example
 * ```ts
 * import { SpectralAccumulator } from "./spectral_core.ts";
 * const x = new Float64Array(64).map((_, i) => Math.sin(i));
 * const acc = new SpectralAccumulator(1, { rate: 64, block: 16 });
 * acc.push([x.subarray(0, 20)]);
 * acc.push([x.subarray(20)]);
 * if (acc.finish().averages !== 7) throw new Error();
 * ```
 */
export class SpectralAccumulator {
  readonly #o: ResolvedOptions;
  readonly #channelCount: number;
  readonly #plan: RealFftPlan;
  readonly #window: Float64Array;
  readonly #lineScale: Float64Array;
  readonly #enbwHz: number;
  readonly #alpha: number;
  /** The samples from #nextStart to the end of the last chunk (fewer than one block). */
  readonly #tail: Float64Array[];
  /** Where the next segment starts, in samples since the first pushed. */
  #nextStart = 0;
  /** One segment assembled from the tail and a new chunk. */
  readonly #stitch: Float64Array[];
  readonly #scratch: Float64Array;
  readonly #re: Float64Array[];
  readonly #im: Float64Array[];
  readonly #auto: Float64Array[];
  readonly #crossRe: Float64Array[];
  readonly #crossIm: Float64Array[];
  #segments = 0;
  #samplesPushed = 0;
  #segmentsBefore = 0; // segments in frames already handed on
  readonly #frames: SpectralOptions["frames"];

  /**
   * @param channelCount number of channels every chunk carries
   * @param options segmenting, window, detrend, averaging and pairs
   * @throws {RangeError} for impossible options
   */
  constructor(channelCount: number, options: SpectralOptions) {
    this.#o = resolveOptions(channelCount, options);
    this.#channelCount = channelCount;
    this.#frames = options.frames;
    const { block, rate } = this.#o;
    this.#plan = realFftPlan(block);
    this.#window = windowSamples(this.#o.window, block);
    const gains = windowGains(this.#window);
    const lines = this.#plan.lines;
    this.#lineScale = oneSidedWeights(block).map((w) => w / (rate * gains.sumOfSquares));
    this.#enbwHz = rate * gains.sumOfSquares / (gains.sum * gains.sum);
    this.#alpha = 1 - Math.exp(-this.#o.hop / (rate * this.#o.tau));
    const make = (count: number, length: number) =>
      Array.from({ length: count }, () => new Float64Array(length));
    this.#tail = make(channelCount, block);
    this.#stitch = make(channelCount, block);
    this.#scratch = new Float64Array(block);
    this.#re = make(channelCount, lines);
    this.#im = make(channelCount, lines);
    this.#auto = make(channelCount, lines);
    this.#crossRe = make(this.#o.pairs.length, lines);
    this.#crossIm = make(this.#o.pairs.length, lines);
  }

  /** Segments completed so far. */
  get segments(): number {
    return this.#segments;
  }

  /**
   * Feeds the next samples of every channel (equal lengths). Any length,
   * including zero, is accepted; segments complete as data arrive.
   *
   * @throws {RangeError} when the chunk's channel count or lengths differ.
   */
  push(chunk: readonly Float64Array[]): void {
    if (chunk.length !== this.#channelCount) {
      throw new RangeError(
        `chunk has ${chunk.length} channels, expected ${this.#channelCount}`,
      );
    }
    const length = chunk[0].length;
    if (chunk.some((c) => c.length !== length)) {
      throw new RangeError("every channel of a chunk must have the same length");
    }
    const { block, hop } = this.#o;
    // The tail holds the samples from tailStart (where the next segment starts) to chunkStart.
    const tailStart = this.#nextStart;
    const chunkStart = this.#samplesPushed;
    const chunkEnd = chunkStart + length;
    this.#samplesPushed = chunkEnd;
    // Segments that lie inside the chunk are read where they stand; only one that straddles
    // the previous chunk is stitched into #stitch from the kept tail (#tail) and this chunk.
    while (this.#nextStart + block <= chunkEnd) {
      const start = this.#nextStart;
      if (start >= chunkStart) {
        this.#processSegment(chunk, start - chunkStart);
      } else {
        const fromTail = chunkStart - start;
        for (let c = 0; c < this.#channelCount; c++) {
          const stitch = this.#stitch[c];
          stitch.set(this.#tail[c].subarray(start - tailStart, chunkStart - tailStart));
          stitch.set(chunk[c].subarray(0, block - fromTail), fromTail);
        }
        this.#processSegment(this.#stitch, 0);
      }
      this.#nextStart += hop;
    }
    // Keep what the next segment needs: the chunk from its start, after the kept tail if the
    // segment starts before this chunk (its samples then number fewer than one block).
    const keepFrom = this.#nextStart;
    for (let c = 0; c < this.#channelCount; c++) {
      const tail = this.#tail[c];
      if (keepFrom >= chunkStart) tail.set(chunk[c].subarray(keepFrom - chunkStart, length));
      else {
        tail.copyWithin(0, keepFrom - tailStart, chunkStart - tailStart);
        tail.set(chunk[c], chunkStart - keepFrom);
      }
    }
  }

  /**
   * Adds one whole segment (exactly one block per channel), bypassing the
   * overlap buffer: for records cut by the caller, such as one record per
   * hammer hit. Detrend and window still apply.
   *
   * @throws {RangeError} when the segment is not one block of every channel.
   */
  pushSegment(segment: readonly Float64Array[]): void {
    if (
      segment.length !== this.#channelCount ||
      segment.some((c) => c.length !== this.#o.block)
    ) {
      throw new RangeError(
        `a segment must hold ${this.#channelCount} channels of ${this.#o.block} samples`,
      );
    }
    this.#processSegment(segment, 0);
  }

  /** Transforms and accumulates the block of every channel that starts at `start`. */
  #processSegment(source: readonly Float64Array[], start: number): void {
    const { detrend, average, pairs } = this.#o;
    const scratch = this.#scratch;
    const window = this.#window;
    for (let c = 0; c < this.#channelCount; c++) {
      const x = source[c];
      const n = scratch.length;
      if (detrend === "linear") {
        for (let i = 0; i < n; i++) scratch[i] = x[start + i];
        detrendInPlace(scratch, detrend);
        for (let i = 0; i < n; i++) scratch[i] *= window[i];
      } else {
        // Mean removal and window in one pass: the same operations, (x − mean)·w.
        let mean = 0;
        if (detrend === "mean") {
          for (let i = 0; i < n; i++) mean += x[start + i];
          mean /= n;
        }
        for (let i = 0; i < n; i++) scratch[i] = (x[start + i] - mean) * window[i];
      }
      this.#plan.forward(scratch, this.#re[c], this.#im[c]);
    }
    const first = this.#segments === 0;
    const alpha = this.#alpha;
    const scale = this.#lineScale;
    const lines = scale.length;
    for (let c = 0; c < this.#channelCount; c++) {
      const re = this.#re[c];
      const im = this.#im[c];
      const acc = this.#auto[c];
      for (let k = 0; k < lines; k++) {
        const p = (re[k] * re[k] + im[k] * im[k]) * scale[k];
        if (first) acc[k] = p;
        else if (average === "linear") acc[k] += p;
        else if (average === "exponential") acc[k] += alpha * (p - acc[k]);
        else if (p > acc[k]) acc[k] = p;
      }
    }
    for (let p = 0; p < pairs.length; p++) {
      const [x, y] = pairs[p];
      const xr = this.#re[x], xi = this.#im[x];
      const yr = this.#re[y], yi = this.#im[y];
      const accRe = this.#crossRe[p], accIm = this.#crossIm[p];
      for (let k = 0; k < lines; k++) {
        // X*·Y = (a − ib)(c + id) = (ac + bd) + i(ad − bc)
        const gr = (xr[k] * yr[k] + xi[k] * yi[k]) * scale[k];
        const gi = (xr[k] * yi[k] - xi[k] * yr[k]) * scale[k];
        if (first) {
          accRe[k] = gr;
          accIm[k] = gi;
        } else if (average === "linear") {
          accRe[k] += gr;
          accIm[k] += gi;
        } else {
          accRe[k] += alpha * (gr - accRe[k]);
          accIm[k] += alpha * (gi - accIm[k]);
        }
      }
    }
    this.#segments++;
    const frames = this.#frames;
    if (frames !== undefined && this.#segments === frames.segments) {
      frames.onFrame(this.#estimate(), this.#segmentsBefore);
      this.#segmentsBefore += this.#segments;
      this.#segments = 0; // the next segment starts a new average
    }
  }

  /**
   * The averaged estimate. The accumulator must not be used afterwards.
   *
   * @throws {QuiverError} when not one whole segment was pushed.
   */
  finish(): SpectralEstimate {
    const o = this.#o;
    if (this.#segments === 0 && this.#segmentsBefore === 0) {
      const n = this.#samplesPushed;
      throw new QuiverError(
        `a block of ${o.block} samples (${
          formatNumber(o.block / o.rate, 6)
        } s) is longer than the record of ${n} samples (${
          formatNumber(n / o.rate, 6)
        } s); choose a smaller block or a coarser resolution`,
      );
    }
    if (this.#segments === 0) {
      // In frames mode every segment already went into a frame: an average of none is no estimate.
      throw new RangeError("every segment went into a frame; finish() has nothing left to average");
    }
    return this.#estimate();
  }

  /** The average of the segments since the start or the last frame. */
  #estimate(): SpectralEstimate {
    const o = this.#o;
    const divisor = o.average === "linear" ? this.#segments : 1;
    const div = (a: Float64Array) => divisor === 1 ? a : a.map((v) => v / divisor);
    const frequencies = new Float64Array(this.#plan.lines).map((_, k) => k * o.rate / o.block);
    return {
      rate: o.rate,
      block: o.block,
      overlapSamples: o.overlapSamples,
      df: o.rate / o.block,
      frequencies,
      averages: this.#segments,
      window: o.window,
      detrend: o.detrend,
      average: o.average,
      ...(o.average === "exponential" ? { tau: o.tau } : {}),
      enbwHz: this.#enbwHz,
      auto: this.#auto.map(div),
      cross: o.pairs.map(([x, y], p) => ({
        x,
        y,
        re: div(this.#crossRe[p]),
        im: div(this.#crossIm[p]),
      })),
    };
  }
}

/**
 * One-shot form of {@linkcode SpectralAccumulator} for data already in memory.
 *
 * @throws {QuiverError} when the channels are shorter than one block.
 *
 * @example
 * ```ts
 * import { spectralEstimate } from "./spectral_core.ts";
 * const x = new Float64Array(4096).map((_, i) => Math.cos(2 * Math.PI * 64 * i / 1024));
 * const e = spectralEstimate([x], { rate: 1024, block: 256 });
 * const peakLine = e.auto[0].indexOf(Math.max(...e.auto[0]));
 * if (e.frequencies[peakLine] !== 64) throw new Error();
 * ```
 */
export function spectralEstimate(
  channels: readonly Float64Array[],
  options: SpectralOptions,
): SpectralEstimate {
  const accumulator = new SpectralAccumulator(channels.length, options);
  accumulator.push(channels);
  return accumulator.finish();
}
