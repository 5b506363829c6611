/**
 * Averaged FRFs with coherence from continuous excitation (shaker random,
 * burst random, sine sweep): the analysis behind the `frf` command. One
 * pass of the spectral core gives Gxx, every Gyy and every Gxy.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { channelIndices } from "../io/recording.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { resolveBlock, type SpectralEstimate, type SpectralOptions } from "../dsp/spectral_core.ts";
import type { DetrendMode } from "../dsp/detrend.ts";
import type { WindowName } from "../dsp/windows.ts";
import { asStream, type RecordingSource, type RecordingStream } from "../io/recording_stream.ts";
import { spectralEstimateOf } from "../dsp/spectral_pipeline.ts";
import { checkAutoSpectra } from "../dsp/averaged_spectrum.ts";
import { coherence, type Estimator, frfEstimate } from "./estimators.ts";
import {
  convertFrfForm,
  formOfResponseUnit,
  formPower,
  type FrfForm,
  frfUnit,
  responseUnitOfForm,
} from "./forms.ts";
import { responseColumns, type ResponseFrf } from "./frf_table.ts";
import type { FrfMetadata } from "./frf_metadata.ts";
import { FRF_SEGMENT_KEYS, segmentMetadata } from "../dsp/segment_metadata.ts";
import type { FrfData } from "./frf_data.ts";
import {
  QUIET_LEVEL,
  TRANSIENT_QUIET_SHARE,
  transientAdvice,
  TransientDetector,
} from "./transient.ts";
import { formatNumber } from "../format_number.ts";

/** Options of {@linkcode frequencyResponse}. */
export interface FrfOptions {
  /** The excitation channel (force). Required. */
  input: string;
  /** The response channels. Required, at least one. */
  outputs: readonly string[];
  /** Estimator. Default `"h1"`. */
  estimator?: Estimator;
  /** Samples per block. Default 4096 unless `resolution` is given. */
  block?: number;
  /** Line spacing in Hz instead of `block`. Default: none. */
  resolution?: number;
  /** Overlap fraction in [0, 1). Default 0.5. */
  overlap?: number;
  /** Window. Default `"hann"`. */
  window?: WindowName;
  /** Detrend. Default `"mean"`. */
  detrend?: DetrendMode;
  /** Output form; default: the measured form (no conversion). */
  form?: FrfForm;
}

/** The FRFs, their table and the warnings that travel with them. */
export interface FrfResult {
  /** The FRFs, typed. */
  readonly frf: FrfData;
  /** The table (see frf_table.ts for its columns). */
  readonly table: Table<FrfMetadata>;
  /** Warnings, also in `table.metadata.warnings`. */
  readonly warnings: readonly string[];
}

/** The FRF part of a table: columns plus the metadata that describes them. */
export interface FrfTableParts {
  /** `frequency_hz`, then six columns per response. */
  readonly columns: TableColumn[];
  /** estimator, input, responses (with forms and units), first_line_dropped. */
  readonly metadata: Pick<FrfMetadata, "estimator" | "responses"> & {
    readonly input: { name: string; unit: string };
    readonly first_line_dropped: boolean;
  };
  /** The same FRFs, typed (without the 0 Hz line when it was dropped). */
  readonly frf: FrfData;
}

/**
 * Turns the core's estimate (channel 0 the input, pairs [0, i] for every
 * response i) into FRF columns in the requested form. Shared by the `frf`
 * and `hammer` analyses. When the conversion divides by jω, the 0 Hz line
 * (undefined there) is dropped from every column.
 *
 * @throws {QuiverError} (usage) when a conversion is asked for a response
 * whose unit does not say what it measures.
 */
export function frfTableParts(
  estimate: SpectralEstimate,
  channels: {
    /** The input (reference) channel, the estimate's channel 0. */
    input: { name: string; unit: string };
    /** The responses, the estimate's channels 1…. */
    outputs: readonly { name: string; unit: string }[];
    /** The estimator. */
    estimator: Estimator;
    /** The form to convert to; undefined keeps the measured one. */
    form: FrfForm | undefined;
  },
): FrfTableParts {
  const { input, outputs, estimator, form } = channels;
  const measured = outputs.map((o) => formOfResponseUnit(o.unit));
  const responses: ResponseFrf[] = outputs.map((output, i) => {
    const cross = estimate.cross[i];
    const spectra = {
      gxx: estimate.auto[0],
      gyy: estimate.auto[i + 1],
      gxyRe: cross.re,
      gxyIm: cross.im,
    };
    let h = frfEstimate(spectra, estimator);
    let responseUnit = output.unit;
    const from = measured[i];
    if (form !== undefined && form !== from) {
      if (from === undefined) {
        throw new QuiverError(
          `cannot convert "${output.name}" to ${form}: its unit [${output.unit}] is not m/s^2, m/s or m`,
          {},
          "usage",
        );
      }
      h = convertFrfForm(h, estimate.frequencies, from, form);
      responseUnit = responseUnitOfForm(form);
    }
    return {
      name: output.name,
      unit: frfUnit(responseUnit, input.unit),
      h,
      coherence: coherence(spectra),
    };
  });
  const dividedAtDc = form !== undefined &&
    measured.some((m) => m !== undefined && formPower(form) < formPower(m));
  const columns: TableColumn[] = [
    { name: "frequency_hz", unit: "", values: estimate.frequencies },
    ...responses.flatMap((r) => responseColumns(r, estimate.averages)),
  ];
  const from = dividedAtDc ? 1 : 0;
  const frf: FrfData = {
    frequencies: estimate.frequencies.subarray(from),
    channels: responses.map((r, i) => {
      const re = r.h.re.subarray(from), im = r.h.im.subarray(from);
      const responseForm = form ?? measured[i];
      return {
        name: r.name,
        unit: r.unit,
        re,
        im,
        magnitude: re.map((v, k) => Math.hypot(v, im[k])),
        coherence: r.coherence.subarray(from),
        ...(responseForm !== undefined ? { form: responseForm } : {}),
      };
    }),
  };
  return {
    frf,
    columns: dividedAtDc ? columns.map((c) => ({ ...c, values: c.values.subarray(1) })) : columns,
    metadata: {
      estimator,
      input: { name: input.name, unit: input.unit },
      responses: outputs.map((o, i) => ({
        name: o.name,
        unit: o.unit,
        measured_form: measured[i] ?? null,
        form: form ?? measured[i] ?? null,
        frf_unit: responses[i].unit,
      })),
      first_line_dropped: dividedAtDc,
    },
  };
}

/** Coherence below which an FRF band is not to be trusted (common practice). */
export const LOW_COHERENCE = 0.5;

/**
 * Warnings for stretches of at least 3 lines where a response's coherence is
 * below {@linkcode LOW_COHERENCE}.
 */
export function lowCoherenceWarnings(columns: readonly TableColumn[]): string[] {
  const f = columns[0].values;
  const warnings: string[] = [];
  for (const c of columns.filter((col) => col.name.endsWith("_coherence"))) {
    const ranges: [number, number][] = [];
    let start = -1;
    for (let k = 1; k <= c.values.length; k++) {
      const low = k < c.values.length && c.values[k] < LOW_COHERENCE;
      if (low && start < 0) start = k;
      if (!low && start >= 0) {
        if (k - start >= 3) ranges.push([f[start], f[k - 1]]);
        start = -1;
      }
    }
    if (ranges.length > 0) {
      const shown = ranges.slice(0, 3).map(([a, b]) => `${formatNumber(a)}–${formatNumber(b)} Hz`)
        .join(", ");
      warnings.push(
        `coherence of "${
          c.name.slice(0, -"_coherence".length)
        }" is below ${LOW_COHERENCE} in ${ranges.length} band(s) (${shown}${
          ranges.length > 3 ? ", …" : ""
        }): the FRF is not to be trusted there`,
      );
    }
  }
  return warnings;
}

/** The warning for an FRF from a single average. */
export const SINGLE_AVERAGE_WARNING =
  "only one average: coherence is identically 1 and says nothing about noise or nonlinearity; the random error column is 0 for the same reason";

/**
 * Averaged FRFs of every output against the input, with coherence and
 * random error.
 *
 * @throws {QuiverError} for unknown channels, a record shorter than one
 * block, an impossible form conversion, a spectrum that overflows or an
 * input channel that is dead (all zero); RangeError for bad options.
 *
 * @example
 * ```ts
 * import { frequencyResponse } from "./frf_analysis.ts";
 * const x = new Float64Array(4096).map((_, i) => Math.sin(0.37 * i) + Math.sin(1.3 * i));
 * const y = x.map((v) => 2.5 * v);
 * const rec = { rate: 1000, startTime: 0, channels: [
 *   { name: "force", unit: "N", data: x }, { name: "acc", unit: "m/s^2", data: y }] };
 * const { table } = await frequencyResponse(rec, { input: "force", outputs: ["acc"], block: 512 });
 * const mag = table.columns.find((c) => c.name === "acc_mag")!;
 * if (Math.abs(mag.values[60] - 2.5) > 1e-9) throw new Error();
 * ```
 */
export async function frequencyResponse(
  source: RecordingSource,
  options: FrfOptions,
): Promise<FrfResult> {
  const stream = asStream(source);
  checkFrfOptions(options);
  const indices = channelIndices(stream.channels, [options.input, ...options.outputs]);
  const channels = indices.map((i) => stream.channels[i]);
  // The input is watched on its way to the core for transient excitation (transient.ts).
  const detector = new TransientDetector(stream.length);
  const watched: RecordingStream = {
    rate: stream.rate,
    startTime: stream.startTime,
    length: stream.length,
    channels: stream.channels,
    read: (selected, onChunk) =>
      stream.read(selected, (chunk) => {
        detector.push(chunk[0]);
        onChunk(chunk);
      }),
  };
  const spectral = frfSpectralOptions(stream.rate, channels.length, options);
  const { estimate, warnings } = await spectralEstimateOf(watched, indices, spectral);
  const finding = detector.finish();
  const advice = transientAdvice(finding, {
    rate: stream.rate,
    startTime: stream.startTime,
    length: stream.length,
    block: spectral.block,
    overlap: options.overlap ?? 0.5,
    window: options.window ?? "hann",
  });
  return frfResult({
    estimate,
    channels,
    options,
    length: stream.length,
    signalWarnings: advice.warning !== undefined ? [...warnings, advice.warning] : warnings,
    excitation: {
      transient: finding.transient,
      quiet_share: finding.quietShare,
      rule:
        `transient when at least ${TRANSIENT_QUIET_SHARE} of ${finding.frameSamples}-sample frames are below ${QUIET_LEVEL} of the record's RMS`,
      burst_period_samples: finding.periodSamples ?? null,
      suggested: advice.suggested ?? null,
      segmenting_suits: advice.suited,
    },
  });
}

function checkFrfOptions(options: FrfOptions): void {
  if (options.outputs.length === 0) {
    throw new RangeError("name at least one response channel");
  }
  if (options.outputs.includes(options.input)) {
    throw new QuiverError(`"${options.input}" is both input and response`, {}, "usage");
  }
}

function frfSpectralOptions(
  rate: number,
  channelCount: number,
  options: FrfOptions,
): SpectralOptions {
  return {
    rate,
    block: resolveBlock(rate, options),
    overlap: options.overlap,
    window: options.window,
    detrend: options.detrend,
    pairs: Array.from({ length: channelCount - 1 }, (_, i) => [0, i + 1] as const),
  };
}

function frfResult(
  { estimate, channels, options, length, signalWarnings, excitation }: {
    estimate: SpectralEstimate;
    channels: readonly { name: string; unit: string }[];
    options: FrfOptions;
    length: number;
    signalWarnings: string[];
    excitation: Readonly<Record<string, unknown>>;
  },
): FrfResult {
  const [input, ...outputs] = channels;
  // Finite results or a refusal: overflowed spectra, or an input with no power at all.
  checkAutoSpectra(estimate, channels);
  if (estimate.auto[0].every((v) => v === 0)) {
    throw new QuiverError(
      `input channel "${input.name}" is dead: its spectrum is zero at every line, so no FRF can be formed (every H would be 0/0); check the force channel and its cable`,
    );
  }
  const estimator = options.estimator ?? "h1";
  const parts = frfTableParts(estimate, { input, outputs, estimator, form: options.form });
  const warnings = [
    ...(estimate.averages === 1 ? [SINGLE_AVERAGE_WARNING] : []),
    ...signalWarnings,
    ...(estimate.averages > 1 ? lowCoherenceWarnings(parts.columns) : []),
  ];
  return {
    frf: parts.frf,
    warnings,
    table: {
      columns: parts.columns,
      metadata: {
        analysis: "frf",
        ...parts.metadata,
        ...segmentMetadata({ ...estimate, overlap: options.overlap ?? 0.5 }, FRF_SEGMENT_KEYS),
        record_samples: length,
        excitation,
        warnings,
      },
    },
  };
}
