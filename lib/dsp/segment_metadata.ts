/**
 * The one writer of the segmenting behind a result, for every analysis that
 * averages segments of the spectral core (spectrum, spectrogram, frf and its
 * matrix, hammer, bands, paths): rate, block, line spacing, overlap,
 * averages, window, detrend and the window's gains, each key from one place.
 *
 * An analysis names the keys it writes, in its own order: JSON keeps the
 * order of insertion, and each result's key order is as it was before this
 * writer (result files compare byte for byte).
 *
 * @module
 */
import type { DetrendMode } from "./detrend.ts";
import type { AveragingMode, SpectralEstimate } from "./spectral_core.ts";
import { WINDOW_DEFINITIONS, windowGains, type WindowName, windowSamples } from "./windows.ts";

/** Every key of the segmenting a result may carry. */
export interface SegmentMetadata {
  /** Sample rate, Hz. */
  rate_hz: number;
  /** Samples per segment. */
  block: number;
  /** Line spacing, Hz. */
  df_hz: number;
  /** Overlap as asked, a fraction of the block. */
  overlap: number;
  /** Samples shared by consecutive segments. */
  overlap_samples: number;
  /** Segments averaged. */
  averages: number;
  /** How they were averaged. */
  average: AveragingMode;
  /** Exponential averaging's time constant, s (only for exponential averaging). */
  tau_s?: number;
  /** Window. */
  window: WindowName;
  /** Where the window's definition comes from. */
  window_source: string;
  /** The window's coherent gain, Σw/N. */
  window_coherent_gain: number;
  /** The window's equivalent noise bandwidth in lines. */
  window_enbw_bins: number;
  /** Equivalent noise bandwidth of one line, Hz. */
  enbw_hz: number;
  /** Trend removed from each segment. */
  detrend: DetrendMode;
}

/** A key of {@linkcode SegmentMetadata}. */
export type SegmentKey = keyof SegmentMetadata;

/**
 * What the segmenting is written from: an estimate of the spectral core
 * (or the fields of one, for an analysis without a final estimate), with
 * the overlap as asked.
 */
export interface Segmenting extends
  Pick<
    SpectralEstimate,
    | "rate"
    | "block"
    | "df"
    | "overlapSamples"
    | "averages"
    | "average"
    | "tau"
    | "window"
    | "detrend"
    | "enbwHz"
  > {
  /** Overlap as asked (the estimate knows only the samples). */
  readonly overlap: number;
}

/** The fields of {@linkcode Segmenting} each key is written from. */
interface Sources {
  rate_hz: "rate";
  block: "block";
  df_hz: "df";
  overlap: "overlap";
  overlap_samples: "overlapSamples";
  averages: "averages";
  average: "average";
  tau_s: "tau";
  window: "window";
  window_source: "window";
  window_coherent_gain: "window" | "block";
  window_enbw_bins: "window" | "block";
  enbw_hz: "enbwHz";
  detrend: "detrend";
}

/** What the writer needs for the keys `K`: only the fields they are written from. */
export type SegmentingFor<K extends SegmentKey> = Pick<Segmenting, Sources[K]>;

const WRITERS: { [K in SegmentKey]-?: (s: Segmenting) => SegmentMetadata[K] } = {
  rate_hz: (s) => s.rate,
  block: (s) => s.block,
  df_hz: (s) => s.df,
  overlap: (s) => s.overlap,
  overlap_samples: (s) => s.overlapSamples,
  averages: (s) => s.averages,
  average: (s) => s.average,
  tau_s: (s) => s.tau,
  window: (s) => s.window,
  window_source: (s) => WINDOW_DEFINITIONS[s.window].source,
  window_coherent_gain: (s) => windowGains(windowSamples(s.window, s.block)).coherentGain,
  window_enbw_bins: (s) => windowGains(windowSamples(s.window, s.block)).enbwBins,
  enbw_hz: (s) => s.enbwHz,
  detrend: (s) => s.detrend,
};

/**
 * The segmenting as result metadata: the keys asked for, in their order,
 * each written from `source`. A key whose value is undefined (`tau_s`
 * without exponential averaging) is left out.
 *
 * @example
 * ```ts
 * import { segmentMetadata } from "./segment_metadata.ts";
 * import { spectralEstimate } from "./spectral_core.ts";
 * const e = spectralEstimate([new Float64Array(64).map((_, i) => Math.sin(i))], { rate: 8, block: 16 });
 * const m = segmentMetadata({ ...e, overlap: 0.5 }, ["df_hz", "averages", "overlap", "overlap_samples", "tau_s", "window_source"]);
 * if (m.df_hz !== 0.5 || m.averages !== 7 || m.overlap !== 0.5 || m.overlap_samples !== 8 || "tau_s" in m) throw new Error();
 * if (Object.keys(m).join() !== "df_hz,averages,overlap,overlap_samples,window_source") throw new Error("in the order asked");
 * ```
 */
export function segmentMetadata<const K extends readonly SegmentKey[]>(
  source: SegmentingFor<K[number]>,
  keys: K,
): Pick<SegmentMetadata, K[number]> {
  // The type of `source` holds every field the keys are written from (SegmentingFor).
  const full = source as Segmenting;
  const written: Partial<Record<SegmentKey, unknown>> = {};
  for (const key of keys) {
    const value = WRITERS[key](full);
    if (value !== undefined) written[key] = value;
  }
  return written as Pick<SegmentMetadata, K[number]>;
}

/**
 * The segmenting in full as an FRF writes it (and the multiple-input FRF):
 * rate, block, line spacing, overlap as asked and in samples, averages,
 * window with its source, and detrend.
 *
 * @example
 * ```ts
 * import { FRF_SEGMENT_KEYS } from "./segment_metadata.ts";
 * if (FRF_SEGMENT_KEYS[0] !== "rate_hz" || FRF_SEGMENT_KEYS.length !== 9) throw new Error();
 * ```
 */
export const FRF_SEGMENT_KEYS = [
  "rate_hz",
  "block",
  "df_hz",
  "overlap",
  "overlap_samples",
  "averages",
  "window",
  "window_source",
  "detrend",
] as const;
