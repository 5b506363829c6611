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
import { levelReference } from "../acoustics/levels.ts";
import { type Weighting, weightingPowerGain } from "../acoustics/weighting.ts";
import type { DetrendMode } from "./detrend.ts";
import { resolveBlock, SpectralAccumulator } from "./spectral_core.ts";
import { autoSpectrum, type SpectrumKind, spectrumUnit } from "./spectrum_kinds.ts";
import type { WindowName } from "./windows.ts";

/** The most cells a spectrogram writes unless asked for more. */
export const MAX_SPECTROGRAM_CELLS = 5_000_000;

/** Options of {@linkcode spectrogram}. */
export interface SpectrogramOptions {
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
  /** Spectrum kind. Default `"psd"`. */
  kind?: SpectrumKind;
  /** Segments averaged per frame. Default 1. */
  frames?: number;
  /** Frequency weighting per line (IEC 61672-1). Default `"Z"` (none). */
  weighting?: Weighting;
  /** Values in dB re the unit's ISO 1683 reference (or `reference`). Default false. */
  db?: boolean;
  /** Level reference for `db`. Default: from the unit (ISO 1683). */
  reference?: number;
  /** Largest number of cells (frames × lines × channels). Default {@linkcode MAX_SPECTROGRAM_CELLS}. */
  maxCells?: number;
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
): Promise<Table> {
  const stream = asStream(source);
  const indices = channelIndices(stream.channels, options.channels);
  const channels = indices.map((i) => stream.channels[i]);
  const rate = stream.rate;
  const block = resolveBlock(rate, options);
  const kind = options.kind ?? "psd";
  const perFrame = options.frames ?? 1;
  const weighting = options.weighting ?? "Z";
  const db = options.db ?? false;
  const references = db ? channels.map((c) => levelReference(c.unit, options.reference)) : [];
  const overlapSamples = Math.floor((options.overlap ?? 0.5) * block);
  const hop = block - overlapSamples;
  const segments = stream.length >= block ? Math.floor((stream.length - block) / hop) + 1 : 0;
  const frameCount = Math.floor(segments / perFrame);
  const lines = Math.floor(block / 2) + 1;
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
  // A line's weighting as a power gain; amplitude kinds take its square root.
  const amplitude = kind === "rms" || kind === "peak";
  let gain: Float64Array | undefined;
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
        gain ??= estimate.frequencies.map((f) => {
          const g = weightingPowerGain(weighting, f);
          return amplitude ? Math.sqrt(g) : g;
        });
        const centre = stream.startTime +
          (firstSegment * hop + ((perFrame - 1) * hop + block) / 2) / rate;
        const offset = frame * lines;
        for (let k = 0; k < lines; k++) {
          time[offset + k] = centre;
          frequency[offset + k] = estimate.frequencies[k];
        }
        channels.forEach((_, c) => {
          const spectrum = autoSpectrum(estimate, c, kind);
          const out = values[c];
          for (let k = 0; k < lines; k++) {
            const v = spectrum[k] * (gain as Float64Array)[k];
            out[offset + k] = db ? dbOf(v, kind, references[c]) : v;
          }
        });
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
  const unit = (c: { unit: string }, i: number) =>
    db
      ? `dB${weighting === "Z" ? "" : `(${weighting})`} re ${references[i]} ${
        kind === "psd" ? `${c.unit}/√Hz` : c.unit
      }`
      : spectrumUnit(c.unit, kind);
  const columns: TableColumn[] = [
    { name: "time_s", unit: "", values: time },
    { name: "frequency_hz", unit: "", values: frequency },
    ...channels.map((c, i) => ({ name: c.name, unit: unit(c, i), values: values[i] })),
  ];
  return {
    columns,
    metadata: {
      analysis: "spectrogram",
      layout: "tidy: one row per (frame, line)",
      rate_hz: rate,
      block,
      df_hz: rate / block,
      overlap_samples: overlapSamples,
      window: options.window ?? "hann",
      detrend: options.detrend ?? "mean",
      kind,
      segments_per_frame: perFrame,
      frames: frameCount,
      weighting,
      db,
      ...(db ? { references } : {}),
      warnings,
    },
  };
}

/** A value of the given kind in dB re `reference` (power kinds 10·lg, amplitude kinds 20·lg). */
function dbOf(value: number, kind: SpectrumKind, reference: number): number {
  return kind === "rms" || kind === "peak"
    ? 20 * Math.log10(value / reference)
    : 10 * Math.log10(value / (reference * reference));
}
