/**
 * Averaged auto spectra of a recording's channels, as a table: the analysis
 * behind the `spectrum` command.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { channelIndices } from "../io/recording.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import { resolveBlock, type SpectralEstimate, type SpectralOptions } from "./spectral_core.ts";
import { spectralEstimateOf } from "./spectral_pipeline.ts";
import { autoSpectrum, type SpectrumKind, spectrumUnit } from "./spectrum_kinds.ts";
import { segmentMetadata } from "./segment_metadata.ts";
import type { SpectrumMetadata } from "./spectrum_metadata.ts";

/** Options of {@linkcode averagedSpectrum}. */
export interface AveragedSpectrumOptions extends Omit<SpectralOptions, "rate" | "block" | "pairs"> {
  /** Channel names, in output order. Default: every channel. */
  channels?: readonly string[];
  /** Samples per block. Default 4096 (`DEFAULT_BLOCK`), unless `resolution` is given. */
  block?: number;
  /** Wanted line spacing in Hz; the block becomes ceil(rate/resolution). Default: none. */
  resolution?: number;
  /** Spectrum kind. Default `"psd"`. */
  kind?: SpectrumKind;
}

/**
 * Computes averaged spectra of the chosen channels in one pass of the
 * spectral core and returns them as a table: `frequency_hz`, then one column
 * per channel with its spectrum unit. The metadata records every parameter
 * needed to reproduce the numbers.
 *
 * @throws {RangeError} for impossible options; {@linkcode QuiverError} when
 * the record is shorter than one block, a channel is unknown, or a
 * channel's spectrum overflows (see {@linkcode checkAutoSpectra}).
 *
 * @example
 * ```ts
 * import { averagedSpectrum } from "./averaged_spectrum.ts";
 * const data = new Float64Array(2048).map((_, i) => Math.sin(2 * Math.PI * 100 * i / 1024));
 * const table = await averagedSpectrum({ rate: 1024, startTime: 0, channels: [{ name: "a", unit: "V", data }] },
 *   { block: 256, kind: "rms" });
 * if (table.columns[1].unit !== "V" || table.metadata.averages !== 15) throw new Error();
 * ```
 */
export async function averagedSpectrum(
  source: RecordingSource,
  options: AveragedSpectrumOptions = {},
): Promise<Table<SpectrumMetadata>> {
  const stream = asStream(source);
  const indices = channelIndices(stream.channels, options.channels);
  const channels = indices.map((i) => stream.channels[i]);
  const { estimate, warnings } = await spectralEstimateOf(
    stream,
    indices,
    spectralOptionsFor(stream.rate, options),
  );
  return spectrumTable({
    estimate,
    channels,
    options,
    length: stream.length,
    startTime: stream.startTime,
    warnings,
  });
}

function spectralOptionsFor(rate: number, options: AveragedSpectrumOptions): SpectralOptions {
  const { overlap, window, detrend, average, tau } = options;
  return { rate, block: resolveBlock(rate, options), overlap, window, detrend, average, tau };
}

function spectrumTable(
  { estimate, channels, options, length, startTime, warnings }: {
    estimate: SpectralEstimate;
    channels: readonly { name: string; unit: string; role?: string }[];
    options: AveragedSpectrumOptions;
    length: number;
    startTime: number;
    warnings: string[];
  },
): Table<SpectrumMetadata> {
  checkAutoSpectra(estimate, channels);
  const kind = options.kind ?? "psd";
  const columns: TableColumn[] = [
    { name: "frequency_hz", unit: "", values: estimate.frequencies },
    ...channels.map((c, i) => ({
      name: c.name,
      unit: spectrumUnit(c.unit, kind),
      values: autoSpectrum(estimate, i, kind),
    })),
  ];
  return {
    columns,
    metadata: {
      analysis: "spectrum",
      kind,
      ...segmentMetadata({ ...estimate, overlap: options.overlap ?? 0.5 }, [
        "rate_hz",
        "block",
        "df_hz",
        "overlap",
        "overlap_samples",
        "averages",
        "average",
        "tau_s",
        "window",
        "window_source",
        "window_coherent_gain",
        "window_enbw_bins",
        "enbw_hz",
        "detrend",
      ]),
      record_samples: length,
      record_start_s: startTime,
      warnings,
      channels: channels.map((c) => ({
        name: c.name,
        unit: c.unit,
        spectrum_unit: spectrumUnit(c.unit, kind),
        ...(c.role !== undefined ? { role: c.role } : {}),
      })),
    },
  };
}

/**
 * Refuses auto spectra that are not finite. The readers accept only finite
 * samples, so a spectrum that is not finite means the sums of squares
 * overflowed: a sample near 1e308 squared exceeds the largest double, about
 * 1.8e308 (IEEE 754-2019 §7.4, overflow to infinity).
 *
 * @throws {QuiverError} (data) naming the channel and the first line.
 *
 * @example
 * ```ts
 * import { checkAutoSpectra } from "./averaged_spectrum.ts";
 * const f = new Float64Array([0, 1]);
 * checkAutoSpectra({ frequencies: f, auto: [new Float64Array([1, 2])] }, [{ name: "a" }]);
 * let refused = false;
 * try { checkAutoSpectra({ frequencies: f, auto: [new Float64Array([1, Infinity])] }, [{ name: "a" }]); }
 * catch (e) { refused = String(e).includes('"a"'); }
 * if (!refused) throw new Error();
 * ```
 */
export function checkAutoSpectra(
  estimate: Pick<SpectralEstimate, "frequencies" | "auto">,
  channels: readonly { name: string }[],
): void {
  channels.forEach((channel, i) => {
    const auto = estimate.auto[i];
    for (let k = 0; k < auto.length; k++) {
      if (auto[k] - auto[k] === 0) continue;
      throw new QuiverError(
        `channel "${channel.name}": the spectrum overflows (${auto[k]} at ${
          formatNumber(estimate.frequencies[k], 6)
        } Hz): its samples are too large for their squares to be summed in double precision (largest double about 1.8e308, IEEE 754); check the data or give them in a larger unit`,
      );
    }
  });
}
