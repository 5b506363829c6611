/**
 * The spectral core's options (spectral_core.ts): segmenting, window,
 * detrend, averaging and pairs, the block from a resolution, and the one
 * check of them all, which every thread that runs the core shares.
 *
 * @module
 */
import { MAX_FFT_SIZE } from "./fft.ts";
import { type DetrendMode, parseDetrendMode } from "./detrend.ts";
import { parseWindowName, type WindowName } from "./windows.ts";
import { parseChoice } from "../choices.ts";
import { AVERAGING_MODES, type AveragingMode, type SpectralEstimate } from "./spectral_estimate.ts";

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

/**
 * The block length whose line spacing is the requested resolution or finer:
 * ceil(rate/df). The spacing actually used, rate/block, is in the result.
 *
 * @throws {RangeError} when rate or resolution is not a positive number, or
 * the block would be longer than the largest transform (`MAX_FFT_SIZE`).
 *
 * @example
 * ```ts
 * import { blockForResolution } from "./spectral_options.ts";
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
 * import { resolveBlock } from "./spectral_options.ts";
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

/** Options with every default filled in and the hop worked out. */
export interface ResolvedOptions {
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
 * import { validateSpectralOptions } from "./spectral_options.ts";
 * let message = "";
 * try { validateSpectralOptions(1, { rate: 100, block: 64, overlap: 1 }); }
 * catch (e) { message = (e as Error).message; }
 * if (!message.includes("overlap")) throw new Error(message);
 * ```
 */
export function validateSpectralOptions(channelCount: number, options: SpectralOptions): void {
  resolveOptions(channelCount, options);
}

/**
 * The options checked, with every default filled in: what
 * {@linkcode SpectralAccumulator} runs on.
 *
 * @throws {RangeError} for impossible options.
 *
 * @example
 * ```ts
 * import { resolveOptions } from "./spectral_options.ts";
 * const o = resolveOptions(2, { rate: 100, block: 64, pairs: [[0, 1]] });
 * if (o.hop !== 32 || o.window !== "hann" || o.average !== "linear") throw new Error();
 * ```
 */
export function resolveOptions(
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
