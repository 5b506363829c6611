/**
 * Fractional-octave band levels of a recording's channels: the analysis
 * behind the `bands` command.
 *
 * Two methods:
 * - `fft` (the default): bands synthesised from the averaged narrowband PSD
 *   of the spectral core, weighting applied line by line. It shares the
 *   spectral core's stated scaling, works at any sample rate, and its energy
 *   bookkeeping is exact (the bands sum to the overall level of the lines
 *   they cover). Its limit is resolution: a band needs several lines, so low
 *   bands need long blocks; bands under 5 lines are warned about.
 * - `filter`: a Butterworth filter bank with multirate decimation (see
 *   filter_bank.ts), weighting applied at each band's mid-band frequency.
 *   Use it when the record is too short for the narrowband resolution the
 *   low bands need.
 *
 * Range: the bands from the one holding `minHz` to the one holding `maxHz`
 * (default 20 Hz to 20 kHz: the bands of those nominal labels, whose exact
 * mid-band frequencies are 19.95 Hz and 19.95 kHz), up to the last whose
 * upper edge lies below half the sample rate (for `filter`, below 0.45 of the
 * rate); a band cut from a range the caller gave is warned about, and the
 * metadata says which bands the rule kept.
 *
 * Levels are for engineering comparison; quiver is not a certified sound
 * level meter.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import { channelIndices } from "../io/recording.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { segmentMetadata } from "../dsp/segment_metadata.ts";
import type { BandsMetadata } from "./bands_metadata.ts";
import { resolveBlock, type SpectralEstimate } from "../dsp/spectral_core.ts";
import { spectralEstimateOf } from "../dsp/spectral_pipeline.ts";
import { asStream, readChecked, type RecordingSource } from "../io/recording_stream.ts";
import { type Band, type BandFraction, bandsHolding } from "./bands.ts";
import { bandPowersFromDensity } from "./band_synthesis.ts";
import { FilterBankMeter, type FilterBankPowers } from "./filter_bank.ts";
import { levelDb, levelReference, levelUnit } from "./levels.ts";
import { type Weighting, weightingDb } from "./weighting.ts";

/**
 * How band levels are computed.
 *
 * @example
 * ```ts
 * import { BAND_METHODS } from "./band_analysis.ts";
 * if (!BAND_METHODS.includes("filter")) throw new Error();
 * ```
 */
export const BAND_METHODS = ["fft", "filter"] as const;

/** One of {@linkcode BAND_METHODS}. */
export type BandMethod = typeof BAND_METHODS[number];

/** Options of {@linkcode bandLevels}. */
export interface BandLevelOptions {
  /** Channels. Default: all. */
  channels?: readonly string[];
  /** Bandwidth designator b. Default 3. */
  fraction?: BandFraction;
  /** Frequency weighting. Default `"Z"`. */
  weighting?: Weighting;
  /** Method. Default `"fft"`. */
  method?: BandMethod;
  /** Level reference (linear, channel unit); default from the unit (ISO 1683). */
  reference?: number;
  /** The lowest band is the one holding this frequency, Hz. Default {@linkcode DEFAULT_BAND_RANGE_HZ}[0]. */
  minHz?: number;
  /**
   * The highest band is the one holding this frequency, Hz, or the last whose
   * upper edge lies below half the sample rate. Default {@linkcode DEFAULT_BAND_RANGE_HZ}[1].
   */
  maxHz?: number;
  /**
   * fft method: samples per block. Default: the power of two that gives the
   * lowest band {@linkcode MIN_LINES_PER_BAND} lines, at most a quarter of the record.
   */
  block?: number;
  /** fft method: line spacing instead of a block. Default: none. */
  resolution?: number;
}

/** Band levels and their summary. */
export interface BandLevelResult {
  /** center_hz, nominal_hz, lower_hz, upper_hz, then one dB column per channel. */
  readonly table: Table<BandsMetadata>;
  /** Overall level per channel (energy sum of the bands), dB. */
  readonly overall: readonly { channel: string; levelDb: number; unit: string }[];
  /** Warnings. */
  readonly warnings: readonly string[];
}

/** The filter method's highest upper band edge, as a fraction of the rate (filter_bank.ts). */
const FILTER_BANK_LIMIT = 0.45;

/** Fewest lines a band should span in the fft method (common practice). */
export const MIN_LINES_PER_BAND = 5;

/**
 * The default band range, Hz: the bands holding 20 Hz and 20 kHz (nominal
 * labels; exact mid-band frequencies 19.95 Hz and 19.95 kHz), the range of
 * hearing (common practice).
 *
 * @example
 * ```ts
 * import { DEFAULT_BAND_RANGE_HZ } from "./band_analysis.ts";
 * if (DEFAULT_BAND_RANGE_HZ.join() !== "20,20000") throw new Error();
 * ```
 */
export const DEFAULT_BAND_RANGE_HZ = [20, 20000] as const;

/**
 * The fft method's default block in words, for help texts: the rule of
 * {@linkcode bandLevels}.
 *
 * @example
 * ```ts
 * import { DEFAULT_BLOCK_RULE } from "./band_analysis.ts";
 * if (!DEFAULT_BLOCK_RULE.includes("5 lines")) throw new Error();
 * ```
 */
export const DEFAULT_BLOCK_RULE =
  `the power of two that gives the lowest band ${MIN_LINES_PER_BAND} lines, at most a quarter of the record`;

/**
 * Band levels of the chosen channels.
 *
 * @throws {QuiverError} for unknown channels, units without a reference, or a
 * record shorter than the block; RangeError for bad options.
 *
 * @example
 * ```ts
 * import { bandLevels } from "./band_analysis.ts";
 * // A 1 kHz tone of 1 Pa rms: 93.98 dB re 20 µPa in the 1 kHz one-third octave (ISO 1683).
 * const data = new Float64Array(48000).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const r = await bandLevels({ rate: 48000, startTime: 0, channels: [{ name: "mic", unit: "Pa", data }] },
 *   { weighting: "Z", minHz: 500, maxHz: 2000 });
 * const row = r.table.columns[1].values.indexOf(1000);
 * if (Math.abs(r.table.columns[4].values[row] - 93.98) > 0.1) throw new Error();
 * ```
 */
export async function bandLevels(
  source: RecordingSource,
  options: BandLevelOptions = {},
): Promise<BandLevelResult> {
  const stream = asStream(source);
  const indices = channelIndices(stream.channels, options.channels);
  if ((options.method ?? "fft") !== "fft") {
    const channels = indices.map((i) => stream.channels[i]);
    const plan = bandPlan(channels, stream.rate, options, []);
    const meters = channels.map(() => new FilterBankMeter(stream.rate, stream.length, plan.bands));
    // The chunks are the reader's reused buffers: the meters may filter them in place.
    const warnings = await readChecked(
      stream,
      indices,
      (chunk) => chunk.forEach((c, i) => meters[i].push(c)),
    );
    plan.warnings.unshift(...warnings);
    return filterBankLevels(channels, stream.rate, plan, meters.map((m) => m.finish()));
  }
  const channels = indices.map((i) => stream.channels[i]);
  const plan = bandPlan(channels, stream.rate, options, []);
  const { estimate, warnings } = await spectralEstimateOf(stream, indices, {
    rate: stream.rate,
    block: fftBlock(stream.rate, stream.length, plan.bands[0], options),
  });
  plan.warnings.unshift(...warnings);
  return bandResult(channels, stream.rate, plan, fftBandPowers(estimate, plan));
}

/** The filter method's band levels from the channels' filter-bank powers. */
function filterBankLevels(
  channels: readonly { name: string; unit: string }[],
  rate: number,
  plan: BandPlan,
  results: readonly FilterBankPowers[],
): BandLevelResult {
  const { bands, weighting, warnings, metadata } = plan;
  // Weighting at each band's mid-band frequency (common practice for band spectra).
  const powers = results.map((r) =>
    r.power.map((p, i) => p * 10 ** (weightingDb(weighting, bands[i].centerHz) / 10))
  );
  const short = results[0].shortRecord;
  if (short.length > 0) {
    warnings.push(
      `${short.length} low band(s) spent over half the record settling; their levels are unreliable`,
    );
  }
  Object.assign(metadata, {
    filter: "Butterworth order 3 band-pass, bilinear with pre-warped edges",
    band_rates_hz: Array.from(results[0].bandRate),
  });
  return bandResult(channels, rate, plan, powers);
}

interface BandPlan {
  fraction: BandFraction;
  weighting: Weighting;
  method: BandMethod;
  references: number[];
  bands: Band[];
  warnings: string[];
  metadata: Record<string, unknown>;
}

function bandPlan(
  channels: readonly { name: string; unit: string }[],
  rate: number,
  options: BandLevelOptions,
  signalWarnings: string[],
): BandPlan {
  const fraction = options.fraction ?? 3;
  const minHz = options.minHz ?? DEFAULT_BAND_RANGE_HZ[0];
  const maxHz = options.maxHz ?? DEFAULT_BAND_RANGE_HZ[1];
  const method = options.method ?? "fft";
  // A band counts only when all of it lies below the limit; beyond, it would read part of a
  // band. The fft method's lines reach Nyquist; the filter bank refuses bands reaching
  // FILTER_BANK_LIMIT of the rate (filter_bank.ts).
  const limit = method === "fft" ? rate / 2 : FILTER_BANK_LIMIT * rate;
  const limitText = method === "fft"
    ? `half the sample rate (${formatNumber(limit, 6)} Hz)`
    : `${FILTER_BANK_LIMIT} of the sample rate (${
      formatNumber(limit, 6)
    } Hz, the filter bank's limit)`;
  const candidates = bandsHolding(fraction, minHz, maxHz);
  const bands: Band[] = candidates.filter((b) => b.upperHz < limit);
  if (bands.length === 0) {
    throw new RangeError(`no band from ${minHz} Hz lies wholly below ${limitText}`);
  }
  const warnings = [...signalWarnings];
  if (bands.length < candidates.length && options.maxHz !== undefined) {
    warnings.push(
      `bands above ${formatNumber(bands[bands.length - 1].nominalHz)} Hz are left out: ` +
        `their upper edges reach beyond ${limitText}`,
    );
  }
  const first = bands[0], last = bands[bands.length - 1];
  return {
    fraction,
    weighting: options.weighting ?? "Z",
    method,
    references: channels.map((c) => levelReference(c.unit, options.reference)),
    bands,
    warnings,
    metadata: {
      // What the range rule chose: the bands holding min and max, cut at Nyquist.
      band_range_nominal_hz: [first.nominalHz, last.nominalHz],
      band_range_rule: `bands holding ${minHz} Hz to ${maxHz} Hz` +
        (bands.length < candidates.length ? `, cut to upper edges below ${limitText}` : ""),
    },
  };
}

/**
 * The fft method's block: given, or from a resolution, or by default the
 * power of two that puts {@linkcode MIN_LINES_PER_BAND} lines into the lowest
 * band asked for (so memory follows the bands, not the record's length),
 * but no longer than a quarter of the record, so that there are averages.
 */
function fftBlock(rate: number, length: number, lowest: Band, options: BandLevelOptions): number {
  const forLowestBand = 2 ** Math.ceil(
    Math.log2((MIN_LINES_PER_BAND * rate) / (lowest.upperHz - lowest.lowerHz)),
  );
  const quarter = 2 ** Math.floor(Math.log2(Math.max(8, length / 4)));
  const defaultBlock = Math.max(8, Math.min(forLowestBand, quarter));
  return resolveBlock(rate, {
    block: options.block ?? (options.resolution === undefined ? defaultBlock : undefined),
    resolution: options.resolution,
  });
}

function fftBandPowers(estimate: SpectralEstimate, plan: BandPlan): Float64Array[] {
  const { bands, weighting, warnings, metadata } = plan;
  const few = bands.filter((b) => (b.upperHz - b.lowerHz) / estimate.df < MIN_LINES_PER_BAND);
  if (few.length > 0) {
    warnings.push(
      `${few.length} band(s) up to ${
        formatNumber(few[few.length - 1].nominalHz)
      } Hz span fewer than ${MIN_LINES_PER_BAND} lines ` +
        `at df ${
          formatNumber(estimate.df, 6)
        } Hz; their levels are unreliable (use a longer block or --method filter)`,
    );
  }
  Object.assign(
    metadata,
    segmentMetadata(estimate, ["block", "df_hz", "averages", "window", "overlap_samples"]),
  );
  return estimate.auto.map((density) =>
    bandPowersFromDensity(
      { frequencies: estimate.frequencies, density, df: estimate.df },
      bands,
      weighting,
    ).power
  );
}

function bandResult(
  channels: readonly { name: string; unit: string }[],
  rate: number,
  plan: BandPlan,
  powers: Float64Array[],
): BandLevelResult {
  const { bands, weighting, references, warnings, method, fraction, metadata } = plan;
  const overall = channels.map((c, i) => {
    const total = powers[i].reduce((s, p) => s + p, 0);
    return {
      channel: c.name,
      levelDb: levelDb(total, references[i]),
      unit: levelUnit(weighting, references[i], c.unit),
    };
  });
  const columns: TableColumn[] = [
    { name: "center_hz", unit: "", values: new Float64Array(bands.map((b) => b.centerHz)) },
    { name: "nominal_hz", unit: "", values: new Float64Array(bands.map((b) => b.nominalHz)) },
    { name: "lower_hz", unit: "", values: new Float64Array(bands.map((b) => b.lowerHz)) },
    { name: "upper_hz", unit: "", values: new Float64Array(bands.map((b) => b.upperHz)) },
    ...channels.map((c, i) => ({
      name: c.name,
      unit: levelUnit(weighting, references[i], c.unit),
      values: powers[i].map((p) => levelDb(p, references[i])),
    })),
  ];
  return {
    overall,
    warnings,
    table: {
      columns,
      metadata: {
        analysis: "bands",
        method,
        fraction,
        weighting,
        references: channels.map((c, i) => ({
          channel: c.name,
          unit: c.unit,
          reference: references[i],
        })),
        overall: overall.map((o) => ({ channel: o.channel, level_db: o.levelDb, unit: o.unit })),
        rate_hz: rate,
        ...metadata,
        warnings,
        note: "engineering comparison only; not a certified sound level meter measurement",
      },
    },
  };
}
