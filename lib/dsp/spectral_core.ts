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
import { MAX_FFT_SIZE, type RealFftPlan, realFftPlan } from "./fft.ts";
import { detrendInPlace, type DetrendMode, parseDetrendMode } from "./detrend.ts";
import { parseWindowName, windowGains, type WindowName, windowSamples } from "./windows.ts";
import { parseChoice } from "../choices.ts";

/**
 * How successive segment spectra are combined.
 *
 * @example
 * ```ts
 * import { AVERAGING_MODES } from "./spectral_core.ts";
 * if (AVERAGING_MODES[0] !== "linear") throw new Error(); // Welch's mean, the default
 * ```
 */
export const AVERAGING_MODES = ["linear", "exponential", "max"] as const;

/**
 * `linear`: the mean of all segments. `exponential`: a running average,
 * S ← (1−α)·S + α·P with α = 1 − exp(−Δt/τ), Δt the time between segment
 * starts, seeded with the first segment. `max`: the largest value per line
 * (auto spectra only; a maximum of complex cross spectra has no meaning).
 */
export type AveragingMode = typeof AVERAGING_MODES[number];

/** Named scaling of a spectrum, as in scipy.signal. */
export type Scaling = "density" | "spectrum";

/**
 * The most segments that may start within one block's length: the hop is at
 * least block/64 (an overlap of at most 98.4 %).
 */
export const MAX_SEGMENTS_PER_BLOCK = 64;

/** Options of the spectral core. */
export interface SpectralOptions {
  /** Sample rate in Hz. Required. */
  rate: number;
  /** Samples per segment (any integer ≥ 8; powers of two are fastest). Required. */
  block: number;
  /** Fraction of a segment shared with the next, in [0, 1). Default 0.5. */
  overlap?: number;
  /** Window applied to each segment. Default `"hann"`. */
  window?: WindowName;
  /** Trend removed from each segment before windowing. Default `"mean"`. */
  detrend?: DetrendMode;
  /** How segments are averaged. Default `"linear"`. */
  average?: AveragingMode;
  /** Time constant τ in seconds for `exponential` averaging. Default 1 s. */
  tau?: number;
  /**
   * Channel pairs [x, y] (indices) whose cross spectrum Gxy = E[X*·Y] is
   * wanted. Default none.
   */
  pairs?: readonly (readonly [number, number])[];
  /**
   * Frames for a spectrogram: after every `segments` segments the average of
   * those segments is handed to `onFrame` (with the index of its first
   * segment, counted from 0) and a new average starts. Default: none (one
   * average of everything, from `finish`).
   */
  frames?: {
    segments: number;
    onFrame: (estimate: SpectralEstimate, firstSegment: number) => void;
  };
}

/** One cross spectrum Gxy between reference channel x and response channel y. */
export interface CrossSpectrum {
  /** Index of x, the conjugated channel. */
  readonly x: number;
  /** Index of y. */
  readonly y: number;
  /** Real part, unitₓ·unitᵧ/Hz. */
  readonly re: Float64Array;
  /** Imaginary part, unitₓ·unitᵧ/Hz. */
  readonly im: Float64Array;
}

/** The averaged result of the core, density-scaled. */
export interface SpectralEstimate {
  /** Sample rate in Hz. */
  readonly rate: number;
  /** Samples per segment. */
  readonly block: number;
  /** Samples shared between consecutive segments. */
  readonly overlapSamples: number;
  /** Line spacing rate/block in Hz. */
  readonly df: number;
  /** Line frequencies 0, df, … in Hz. */
  readonly frequencies: Float64Array;
  /** Number of segments that went into the average. */
  readonly averages: number;
  /** Window name. */
  readonly window: WindowName;
  /** Detrend mode. */
  readonly detrend: DetrendMode;
  /** Averaging mode. */
  readonly average: AveragingMode;
  /** Exponential time constant in s (exponential averaging only). */
  readonly tau?: number;
  /** Equivalent noise bandwidth of one line in Hz: fs·Σw²/(Σw)². */
  readonly enbwHz: number;
  /** One-sided auto spectral density Gxx per channel, unit²/Hz. */
  readonly auto: readonly Float64Array[];
  /** The requested cross spectral densities. */
  readonly cross: readonly CrossSpectrum[];
}

/**
 * One-sided weights: 2 for every line except DC and, for an even block, the
 * Nyquist line, which have no negative-frequency twin. Written once, used by
 * every scaling.
 *
 * @example
 * ```ts
 * import { oneSidedWeights } from "./spectral_core.ts";
 * const w = oneSidedWeights(4);
 * if (w.join() !== "1,2,1") throw new Error();
 * ```
 */
export function oneSidedWeights(block: number): Float64Array {
  const lines = Math.floor(block / 2) + 1;
  const w = new Float64Array(lines).fill(2);
  w[0] = 1;
  if (block % 2 === 0) w[lines - 1] = 1;
  return w;
}

/**
 * Factor that turns the core's density (unit²/Hz) into the named scaling:
 * 1 for `"density"`, the ENBW in Hz for `"spectrum"` (unit² per line).
 *
 * @example
 * ```ts
 * import { scaleFactor } from "./spectral_core.ts";
 * const e = { enbwHz: 1.5 } as Parameters<typeof scaleFactor>[0];
 * if (scaleFactor(e, "spectrum") !== 1.5) throw new Error();
 * ```
 */
export function scaleFactor(
  estimate: Pick<SpectralEstimate, "enbwHz">,
  scaling: Scaling,
): number {
  return scaling === "density" ? 1 : estimate.enbwHz;
}

/**
 * The block length whose line spacing is the requested resolution or finer:
 * ceil(rate/df). The spacing actually used, rate/block, is in the result.
 *
 * @throws {RangeError} when rate or resolution is not a positive number, or
 * the block would be longer than the largest transform (`MAX_FFT_SIZE`).
 *
 * @example
 * ```ts
 * import { blockForResolution } from "./spectral_core.ts";
 * if (blockForResolution(1024, 0.5) !== 2048) throw new Error();
 * ```
 */
export function blockForResolution(rate: number, resolution: number): number {
  if (!(rate > 0) || !Number.isFinite(rate)) {
    throw new RangeError(`rate must be a positive number, got ${rate}`);
  }
  if (!(resolution > 0) || !Number.isFinite(resolution)) {
    throw new RangeError(
      `resolution must be a positive number of Hz, got ${resolution}`,
    );
  }
  // The tolerance keeps 1024/0.5 at 2048 despite rounding in the division.
  const block = Math.ceil(rate / resolution - 1e-9);
  if (block > MAX_FFT_SIZE) {
    throw new RangeError(
      `a resolution of ${resolution} Hz at ${rate} Hz needs a block of ${block} samples; ` +
        `the largest is ${MAX_FFT_SIZE}, so the finest resolution is ${rate / MAX_FFT_SIZE} Hz`,
    );
  }
  return block;
}

/** Default block length when neither block nor resolution is given. */
export const DEFAULT_BLOCK = 4096;

/**
 * The block length from a block or a resolution (default {@linkcode DEFAULT_BLOCK}).
 * Whether the record holds a block is known only once it has been read: the
 * accumulator says so then ({@linkcode SpectralAccumulator.finish}), after any
 * fault in the data itself.
 *
 * @throws {RangeError} when both are given.
 *
 * @example
 * ```ts
 * import { resolveBlock } from "./spectral_core.ts";
 * if (resolveBlock(2048, { resolution: 1 }) !== 2048) throw new Error();
 * ```
 */
export function resolveBlock(
  rate: number,
  choice: { block?: number; resolution?: number },
): number {
  if (choice.block !== undefined && choice.resolution !== undefined) {
    throw new RangeError("give a block length or a resolution, not both");
  }
  return choice.resolution !== undefined
    ? blockForResolution(rate, choice.resolution)
    : choice.block ?? DEFAULT_BLOCK;
}

/** Smallest block the core accepts. */
export const MIN_BLOCK = 8;

interface ResolvedOptions {
  rate: number;
  block: number;
  overlapSamples: number;
  hop: number;
  window: WindowName;
  detrend: DetrendMode;
  average: AveragingMode;
  tau: number;
  pairs: readonly (readonly [number, number])[];
}

/**
 * Checks the options as {@linkcode SpectralAccumulator}'s constructor does,
 * with the same errors, without building anything: for a caller that hands
 * the core to another thread and wants the errors here.
 *
 * @throws {RangeError} for impossible options.
 *
 * @example
 * ```ts
 * import { validateSpectralOptions } from "./spectral_core.ts";
 * let message = "";
 * try { validateSpectralOptions(1, { rate: 100, block: 64, overlap: 1 }); }
 * catch (e) { message = (e as Error).message; }
 * if (!message.includes("overlap")) throw new Error(message);
 * ```
 */
export function validateSpectralOptions(channelCount: number, options: SpectralOptions): void {
  resolveOptions(channelCount, options);
}

function resolveOptions(
  channelCount: number,
  options: SpectralOptions,
): ResolvedOptions {
  if (!Number.isInteger(channelCount) || channelCount < 1) {
    throw new RangeError(
      `the spectral core needs at least one channel, got ${channelCount}`,
    );
  }
  if (
    options.frames !== undefined &&
    !(Number.isInteger(options.frames.segments) && options.frames.segments >= 1)
  ) {
    throw new RangeError(`a frame needs at least one segment, got ${options.frames.segments}`);
  }
  const { rate, block } = options;
  if (!(rate > 0) || !Number.isFinite(rate)) {
    throw new RangeError(`rate must be a positive number of Hz, got ${rate}`);
  }
  if (!Number.isInteger(block) || block < MIN_BLOCK || block > MAX_FFT_SIZE) {
    throw new RangeError(
      `block must be an integer from ${MIN_BLOCK} to ${MAX_FFT_SIZE} samples, got ${block}`,
    );
  }
  const overlap = options.overlap ?? 0.5;
  if (!(overlap >= 0 && overlap < 1)) {
    throw new RangeError(`overlap must be in [0, 1), got ${overlap}`);
  }
  const overlapSamples = Math.floor(overlap * block);
  // Beyond ~75 % overlap a windowed estimate gains almost nothing (Welch 1967; Harris
  // 1978), while the work grows as 1/hop: a hop of one sample turns seconds into hours.
  const minimumHop = Math.max(1, Math.ceil(block / MAX_SEGMENTS_PER_BLOCK));
  if (block - overlapSamples < minimumHop) {
    throw new RangeError(
      `an overlap of ${overlap} moves each block by ${
        block - overlapSamples
      } sample(s); quiver needs at least ${minimumHop} (1/${MAX_SEGMENTS_PER_BLOCK} of the ${block}-sample block, an overlap of at most ${
        Number((1 - minimumHop / block).toFixed(4))
      }); 0.5 to 0.75 is usual`,
    );
  }
  // Names from plain JavaScript or a cast: refused naming the allowed ones, not a TypeError later.
  const window = parseWindowName(options.window ?? "hann");
  const detrend = parseDetrendMode(options.detrend ?? "mean");
  const average = parseChoice(options.average ?? "linear", AVERAGING_MODES, "averaging mode");
  const tau = options.tau ?? 1;
  if (!(tau > 0) || !Number.isFinite(tau)) {
    throw new RangeError(`tau must be a positive number of seconds, got ${tau}`);
  }
  const pairs = options.pairs ?? [];
  for (const [x, y] of pairs) {
    for (const index of [x, y]) {
      if (!Number.isInteger(index) || index < 0 || index >= channelCount) {
        throw new RangeError(
          `cross-spectrum pair names channel ${index}, but there are ${channelCount}`,
        );
      }
    }
  }
  if (average === "max" && pairs.length > 0) {
    throw new RangeError(
      "max-hold averaging applies to auto spectra only; cross spectra need linear or exponential averaging",
    );
  }
  return {
    rate,
    block,
    overlapSamples,
    hop: block - overlapSamples,
    window,
    detrend,
    average,
    tau,
    pairs,
  };
}

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
