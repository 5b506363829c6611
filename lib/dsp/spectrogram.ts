/**
 * Spectra against time: one spectrum per frame of `frames` consecutive
 * segments (one segment by default, as `scipy.signal.spectrogram`), each
 * scaled exactly as an averaged spectrum of the same options (the one
 * spectral core's frames, spectral_core.ts). Optionally weighted line by line
 * (IEC 61672-1 A or C) and in dB re the unit's ISO 1683 reference.
 *
 * Output, tidy: `time_s` (the frame's centre on the recording's time axis),
 * `frequency_hz`, then one column per channel.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { channelIndices } from "../io/recording.ts";
import { asStream, readChecked, type RecordingSource } from "../io/recording_stream.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { levelReference, levelUnit } from "../acoustics/levels.ts";
import { type Weighting, weightingPowerGain } from "../acoustics/weighting.ts";
import type { DetrendMode } from "./detrend.ts";
import { resolveBlock, SpectralAccumulator, type SpectralEstimate } from "./spectral_core.ts";
import { autoSpectrum, type SpectrumKind, spectrumUnit } from "./spectrum_kinds.ts";
import type { WindowName } from "./windows.ts";
import { type SegmentMetadata, segmentMetadata } from "./segment_metadata.ts";
import type { SpectrogramMetadata } from "./spectrogram_metadata.ts";

/** The most cells a spectrogram writes unless asked for more. */
export const MAX_SPECTROGRAM_CELLS = 5_000_000;

/** Options of {@linkcode spectrogram}. */
export interface SpectrogramOptions extends FrameScalingOptions {
  /** Channels. Default: all. */
  channels?: readonly string[];
  /** Samples per segment. Default 4096 (or from `resolution`). */
  block?: number;
  /** Line spacing, Hz, instead of `block`. Default: none. */
  resolution?: number;
  /** Overlap of consecutive segments, [0, 1). Default 0.5. */
  overlap?: number;
  /** Window. Default `"hann"`. */
  window?: WindowName;
  /** Detrend per segment. Default `"mean"`. */
  detrend?: DetrendMode;
  /** Segments averaged per frame. Default 1. */
  frames?: number;
  /** Largest number of cells (frames × lines × channels). Default {@linkcode MAX_SPECTROGRAM_CELLS}. */
  maxCells?: number;
  /** Lowest frequency kept, Hz (lines below it are left out). Default 0. */
  minHz?: number;
  /** Highest frequency kept, Hz, at most half the rate. Default: half the rate. */
  maxHz?: number;
}

/** The lines a frequency range keeps: the first index and how many. */
export interface LineRange {
  /** Index of the first line kept (line k is at k·df). */
  readonly first: number;
  /** Lines kept. */
  readonly count: number;
}

/**
 * The lines of a spectrum of `block` samples at `rate` that lie inside
 * [minHz, maxHz] (both ends included): line k is at k·rate/block.
 *
 * @throws {RangeError} for a negative or reversed range, or a limit above
 * half the rate (no line lies there: the limit would be a silent no-op).
 * @throws {QuiverError} (usage) when no line lies inside the range.
 *
 * @example
 * ```ts
 * import { linesInRange } from "./spectrogram.ts";
 * // Lines 1 Hz apart (rate 1024, block 1024): 10 … 20 Hz holds lines 10 to 20.
 * const r = linesInRange(1024, 1024, 10, 20);
 * if (r.first !== 10 || r.count !== 11) throw new Error();
 * ```
 */
export function linesInRange(
  rate: number,
  block: number,
  minHz: number | undefined,
  maxHz: number | undefined,
): LineRange {
  const lines = Math.floor(block / 2) + 1;
  const df = rate / block;
  const nyquist = rate / 2;
  const lo = minHz ?? 0, hi = maxHz ?? nyquist;
  if (!(Number.isFinite(lo) && lo >= 0)) {
    throw new RangeError(`the lowest frequency must be 0 Hz or more, got ${lo}`);
  }
  if (!(Number.isFinite(hi) && hi > lo)) {
    throw new RangeError(`the highest frequency (${hi} Hz) must be above the lowest (${lo} Hz)`);
  }
  if (hi > nyquist || lo > nyquist) {
    throw new RangeError(
      `the frequency range ${lo}–${hi} Hz reaches above half the rate (${nyquist} Hz)`,
    );
  }
  // A small tolerance: a limit written as a line's frequency keeps that line.
  const first = Math.max(0, Math.ceil(lo / df - 1e-9));
  const last = Math.min(lines - 1, Math.floor(hi / df + 1e-9));
  if (last < first) {
    throw new QuiverError(
      `no line of the spectrum (lines ${df} Hz apart) lies within ${lo}–${hi} Hz; widen the range or use a longer block`,
      {},
      "usage",
    );
  }
  return { first, count: last - first + 1 };
}

/**
 * The spectrogram of the chosen channels.
 *
 * @throws {QuiverError} for a record shorter than one segment, an output over
 * `maxCells` (naming the count and how to coarsen), or a unit without a
 * level reference; RangeError for bad options.
 *
 * @example
 * ```ts
 * import { spectrogram } from "./spectrogram.ts";
 * // 1 s of a 64 Hz tone of 1 rms, then 1 s of silence: rms per line, 256-sample segments.
 * const data = new Float64Array(2048).map((_, i) => i < 1024 ? Math.SQRT2 * Math.sin(2 * Math.PI * 64 * i / 1024) : 0);
 * const t = await spectrogram({ rate: 1024, startTime: 0, channels: [{ name: "a", unit: "V", data }] },
 *   { block: 256, overlap: 0, kind: "rms" });
 * const [time, f, a] = t.columns.map((c) => c.values);
 * const at = (s: number, hz: number) => a[time.findIndex((v, i) => v === s && f[i] === hz)];
 * if (Math.abs(at(0.125, 64) - 1) > 1e-9 || at(1.875, 64) !== 0) throw new Error();
 * ```
 */
export async function spectrogram(
  source: RecordingSource,
  options: SpectrogramOptions = {},
): Promise<Table<SpectrogramMetadata>> {
  const stream = asStream(source);
  const indices = channelIndices(stream.channels, options.channels);
  const channels = indices.map((i) => stream.channels[i]);
  const rate = stream.rate;
  const block = resolveBlock(rate, options);
  const kind = options.kind ?? "psd";
  const perFrame = options.frames ?? 1;
  const scaling = new FrameScaling(channels, options);
  const overlapSamples = Math.floor((options.overlap ?? 0.5) * block);
  const hop = block - overlapSamples;
  const segments = stream.length >= block ? Math.floor((stream.length - block) / hop) + 1 : 0;
  const frameCount = Math.floor(segments / perFrame);
  const kept = linesInRange(rate, block, options.minHz, options.maxHz);
  const lines = kept.count;
  const cells = frameCount * lines * channels.length;
  const maxCells = options.maxCells ?? MAX_SPECTROGRAM_CELLS;
  if (cells > maxCells) {
    throw new QuiverError(
      `the spectrogram would hold ${cells} cells (${frameCount} frames × ${lines} lines × ${channels.length} channel(s)), over ${maxCells}; coarsen it (a smaller block, more segments per frame, a time slice) or allow more`,
      {},
      "usage",
    );
  }
  const time = new Float64Array(frameCount * lines);
  const frequency = new Float64Array(frameCount * lines);
  const values = channels.map(() => new Float64Array(frameCount * lines));
  let frame = 0;
  const accumulator = new SpectralAccumulator(channels.length, {
    rate,
    block,
    overlap: options.overlap,
    window: options.window,
    detrend: options.detrend,
    frames: {
      segments: perFrame,
      onFrame(estimate, firstSegment) {
        if (frame >= frameCount) return;
        const centre = stream.startTime +
          (firstSegment * hop + ((perFrame - 1) * hop + block) / 2) / rate;
        const offset = frame * lines;
        for (let k = 0; k < lines; k++) {
          time[offset + k] = centre;
          frequency[offset + k] = estimate.frequencies[kept.first + k];
        }
        scaling.write(estimate, values, offset, kept);
        frame++;
      },
    },
  });
  const warnings = await readChecked(stream, indices, (chunk) => accumulator.push(chunk));
  if (frame === 0) {
    if (accumulator.segments === 0) accumulator.finish(); // throws: shorter than one segment
    throw new QuiverError(
      `the record holds ${accumulator.segments} segment(s) of ${block} samples, fewer than one frame of ${perFrame}; use fewer segments per frame or a smaller block`,
    );
  }
  const columns: TableColumn[] = [
    { name: "time_s", unit: "", values: time },
    { name: "frequency_hz", unit: "", values: frequency },
    ...channels.map((c, i) => ({ name: c.name, unit: scaling.units[i], values: values[i] })),
  ];
  return {
    columns,
    metadata: {
      analysis: "spectrogram",
      against: "time",
      layout: "tidy: one row per (frame, line)",
      ...spectrogramSegmenting(rate, block, overlapSamples, options),
      kind,
      segments_per_frame: perFrame,
      frames: frameCount,
      ...rangeMetadata(rate, block, kept),
      ...scaling.metadata(),
      warnings,
    },
  };
}

/**
 * The segmenting of a spectrogram (against time or rpm), as its metadata
 * writes it: rate, block, line spacing, overlap in samples, window and
 * detrend (the core's defaults where the options give none).
 *
 * @example
 * ```ts
 * import { spectrogramSegmenting } from "./spectrogram.ts";
 * const m = spectrogramSegmenting(1024, 256, 128, {});
 * if (m.df_hz !== 4 || m.window !== "hann" || Object.keys(m)[0] !== "rate_hz") throw new Error();
 * ```
 */
export function spectrogramSegmenting(
  rate: number,
  block: number,
  overlapSamples: number,
  options: Pick<SpectrogramOptions, "window" | "detrend">,
): Pick<SegmentMetadata, "rate_hz" | "block" | "df_hz" | "overlap_samples" | "window" | "detrend"> {
  return segmentMetadata({
    rate,
    block,
    df: rate / block,
    overlapSamples,
    window: options.window ?? "hann",
    detrend: options.detrend ?? "mean",
  }, ["rate_hz", "block", "df_hz", "overlap_samples", "window", "detrend"]);
}

/**
 * The frequency range a spectrogram kept, for its metadata: the first and
 * last line's frequency, Hz, and the lines per frame.
 *
 * @example
 * ```ts
 * import { rangeMetadata } from "./spectrogram.ts";
 * const m = rangeMetadata(1024, 512, { first: 5, count: 3 }); // lines 2 Hz apart
 * if (m.min_hz !== 10 || m.max_hz !== 14 || m.lines !== 3) throw new Error();
 * ```
 */
export function rangeMetadata(rate: number, block: number, kept: LineRange): {
  min_hz: number;
  max_hz: number;
  lines: number;
} {
  const df = rate / block;
  return { min_hz: kept.first * df, max_hz: (kept.first + kept.count - 1) * df, lines: kept.count };
}

/** How a frame's lines become a spectrogram's values: spectrum kind, weighting, dB. */
export interface FrameScalingOptions {
  /** Spectrum kind. Default `"psd"`. */
  kind?: SpectrumKind;
  /** Frequency weighting per line (IEC 61672-1). Default `"Z"` (none). */
  weighting?: Weighting;
  /** Values in dB re the unit's ISO 1683 reference (or `reference`). Default false. */
  db?: boolean;
  /** Level reference for `db`. Default: from the unit (ISO 1683). */
  reference?: number;
}

/**
 * The one rule by which every spectrogram (against time or rpm) turns a
 * frame's estimate into values: the spectrum kind of the spectral core,
 * times the weighting's gain at each line (power kinds take the power gain,
 * amplitude kinds its square root), then optionally in dB (power kinds
 * 10·lg(v/ref²), amplitude kinds 20·lg(v/ref)).
 *
 * @example
 * ```ts
 * import { FrameScaling } from "./spectrogram.ts";
 * import { SpectralAccumulator } from "./spectral_core.ts";
 * const acc = new SpectralAccumulator(1, { rate: 64, block: 64, window: "rectangular", detrend: "none" });
 * acc.push([new Float64Array(64).map((_, i) => Math.SQRT2 * Math.cos(2 * Math.PI * 8 * i / 64))]); // 1 Pa rms at 8 Hz
 * const scaling = new FrameScaling([{ unit: "Pa" }], { kind: "rms", db: true });
 * const out = [new Float64Array(33)];
 * scaling.write(acc.finish(), out, 0);
 * if (Math.abs(out[0][8] - 93.9794) > 1e-4 || scaling.units[0] !== "dB re 20 µPa") throw new Error();
 * ```
 */
export class FrameScaling {
  /** Column unit per channel. */
  readonly units: readonly string[];
  readonly #kind: SpectrumKind;
  readonly #weighting: Weighting;
  readonly #db: boolean;
  readonly #references: readonly number[];
  #gain: Float64Array | undefined;

  /**
   * @param channels the channels' units, in output order
   * @param options kind, weighting and dB
   * @throws {QuiverError} with `db` for a unit without a level reference.
   */
  constructor(channels: readonly { unit: string }[], options: FrameScalingOptions = {}) {
    this.#kind = options.kind ?? "psd";
    this.#weighting = options.weighting ?? "Z";
    this.#db = options.db ?? false;
    this.#references = this.#db
      ? channels.map((c) => levelReference(c.unit, options.reference))
      : [];
    const kind = this.#kind;
    this.units = channels.map((c, i) =>
      this.#db
        ? levelUnit(this.#weighting, this.#references[i], kind === "psd" ? `${c.unit}/√Hz` : c.unit)
        : spectrumUnit(c.unit, kind)
    );
  }

  /**
   * Writes every channel's scaled lines of `estimate` (those of `range`,
   * default all) into `out[c]` from `offset`.
   */
  write(
    estimate: SpectralEstimate,
    out: readonly Float64Array[],
    offset: number,
    range: LineRange = { first: 0, count: estimate.frequencies.length },
  ): void {
    const amplitude = this.#kind === "rms" || this.#kind === "peak";
    const weighting = this.#weighting;
    const gain = this.#gain ??= estimate.frequencies.map((f) => {
      const g = weightingPowerGain(weighting, f);
      return amplitude ? Math.sqrt(g) : g;
    });
    for (let c = 0; c < out.length; c++) {
      const spectrum = autoSpectrum(estimate, c, this.#kind);
      const values = out[c];
      const reference = this.#references[c];
      for (let i = 0; i < range.count; i++) {
        const k = range.first + i;
        const v = spectrum[k] * gain[k];
        values[offset + i] = !this.#db
          ? v
          : amplitude
          ? 20 * Math.log10(v / reference)
          : 10 * Math.log10(v / (reference * reference));
      }
    }
  }

  /** The scaling as written into a result's metadata. */
  metadata(): { weighting: Weighting; db: boolean; references?: readonly number[] } {
    return {
      weighting: this.#weighting,
      db: this.#db,
      ...(this.#db ? { references: this.#references } : {}),
    };
  }
}
