/**
 * Tonal prominence of microphone channels (ECMA-418-1): the tones of the
 * averaged spectrum of the record, or the tones of given orders at each rpm
 * step of a run-up, each with its TNR, PR and the criterion's verdict.
 *
 * Spectra come from the one spectral core: the record's averaged density
 * through `spectralEstimateOf`, and the frames at the rpm steps through the
 * spectrogram against rpm (lib/orders/rpm_spectrogram.ts), so the speed
 * estimate and the steps' instants are those of `orders`. The window is
 * Hann: the tones' lines are its main lobe (tone_to_noise.ts).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { channelIndices } from "../io/recording.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import type { ColumnValues, Table, TableColumn } from "../io/table.ts";
import { checkAutoSpectra } from "../dsp/averaged_spectrum.ts";
import { spectralEstimateOf } from "../dsp/spectral_pipeline.ts";
import { spectrumUnit } from "../dsp/spectrum_kinds.ts";
import { segmentMetadata } from "../dsp/segment_metadata.ts";
import { levelDb, levelUnit, standardReference } from "../acoustics/levels.ts";
import { spectrogramAgainstRpm } from "../orders/rpm_spectrogram.ts";
import {
  type RpmStepOptions,
  speedChannelName,
  type SpeedSource,
  speedSourceMetadata,
} from "../orders/speed.ts";
import { findTones, type Tone, toneAt } from "./tones_search.ts";
import { CRITERIA_RANGE_HZ, type Criterion, prCriterion, tnrCriterion } from "./tones_criteria.ts";
import type { TonesMetadata } from "./tones_metadata.ts";

/** What the results say of themselves: quiver is no certified instrument. */
export const SAFETY_NOTE =
  "quiver's tonal prominence (after ECMA-418-1) is for engineering comparison; it is not a certified instrument, and a declaration of prominent tones follows local regulations and licensed practice";

/** The standard the method follows, as the result names it. */
export const STANDARD = "ECMA-418-1 (tone-to-noise ratio and prominence ratio)";

/** Options of {@linkcode tonesAnalysis}. */
export interface TonesOptions extends SpeedSource, RpmStepOptions {
  /** Channels. Default: every channel whose unit is Pa. */
  readonly channels?: readonly string[];
  /** The whole record's averaged spectrum ("time") or orders at rpm steps ("rpm"). Default "time". */
  readonly against?: "time" | "rpm";
  /** Orders (against rpm). Default: none (required against rpm). */
  readonly orders?: readonly number[];
  /** Samples per block. Default: the power of two giving lines at most 2 Hz apart ("time"), 8 Hz ("rpm"). */
  readonly block?: number;
  /** Line spacing instead of `block`, Hz. Default: none. */
  readonly resolution?: number;
  /** Fraction of a block shared with the next. Default 0.5. */
  readonly overlap?: number;
  /** Segments averaged per rpm step. Default 4. */
  readonly frames?: number;
  /** A peak is a tone from this TNR up, dB ("time"). Default 0. */
  readonly minTnr?: number;
  /** The criterion of the verdict. Default "tnr". */
  readonly criterion?: Criterion;
}

/** A tones result: the table, and against time the averaged PSD the tones were found in. */
export interface TonesResult {
  readonly table: Table<TonesMetadata, ColumnValues>;
  readonly spectrum?: Table;
}

/** The power of two whose lines at `rate` are at most `df` Hz apart. */
const blockFor = (rate: number, df: number) => 2 ** Math.ceil(Math.log2(rate / df));

/** Every channel in Pa, or those named; refused when none is in Pa. */
function chosenChannels(
  channels: readonly { name: string; unit: string }[],
  options: TonesOptions,
  leaveOut: string | undefined,
): number[] {
  if (options.channels !== undefined) return channelIndices(channels, options.channels);
  const inPa = channels.flatMap((c, i) => c.unit === "Pa" && c.name !== leaveOut ? [i] : []);
  if (inPa.length === 0) {
    throw new QuiverError(
      "no channel is in Pa (the default is every microphone channel); name channels with --channels or give their unit in a set-up",
      {},
      "usage",
    );
  }
  return inPa;
}

/** The level reference of a unit: its standard one (20 µPa for Pa), else 1 unit. */
const referenceOf = (unit: string) => standardReference(unit) ?? 1;

interface Row {
  readonly channel: string;
  readonly rpm?: number;
  readonly order?: number;
  readonly tone: Tone;
  readonly frequency: number;
  readonly reference: number;
}

function tableOf(
  rows: readonly Row[],
  againstRpm: boolean,
  levelUnitName: string,
  metadata: TonesMetadata,
): Table<TonesMetadata, ColumnValues> {
  const num = (name: string, unit: string, f: (r: Row) => number): TableColumn => ({
    name,
    unit,
    values: Float64Array.from(rows, f),
  });
  const limit = (r: Row) =>
    (metadata.criterion === "tnr" ? tnrCriterion(r.frequency) : prCriterion(r.frequency)) ?? NaN;
  return {
    columns: [
      { name: "channel", unit: "", values: rows.map((r) => r.channel) },
      ...(againstRpm ? [num("rpm", "rpm", (r) => r.rpm!), num("order", "", (r) => r.order!)] : []),
      num("frequency_hz", "Hz", (r) => r.frequency),
      num("level_db", levelUnitName, (r) => levelDb(r.tone.tonePower, r.reference)),
      num("tnr_db", "dB", (r) => r.tone.tnrDb),
      num("pr_db", "dB", (r) => r.tone.prDb),
      { name: "prominent", unit: "", values: rows.map((r) => String(r.tone.prominent)) },
      num("margin_db", "dB", (r) => r.tone.marginDb),
      num("criterion_db", "dB", limit),
      num("critical_bandwidth_hz", "Hz", (r) => r.tone.criticalBandwidth),
    ],
    metadata,
  };
}

/**
 * The tones of the chosen channels: one row per tone of the averaged
 * spectrum (`against: "time"`), or per channel, rpm step and order
 * (`against: "rpm"`). Columns: channel, [rpm, order,] frequency_hz,
 * level_db, tnr_db, pr_db, prominent ("true"/"false"), margin_db,
 * criterion_db, critical_bandwidth_hz.
 *
 * @throws {QuiverError} when no channel is in Pa and none is named, the
 * record is shorter than one block, or the speed does not cover the steps;
 * RangeError for bad options.
 *
 * @example
 * ```ts
 * import { tonesAnalysis } from "./tones_analysis.ts";
 * // A 1 kHz tone of 0.1 Pa rms in uniform noise (a linear congruential generator) at 8192 Hz.
 * const rate = 8192;
 * let seed = 1;
 * const noise = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648 - 0.5;
 * const data = new Float64Array(8 * rate).map((_, i) => 0.03 * noise() + 0.1 * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / rate));
 * const { table: t } = await tonesAnalysis({ rate, startTime: 0, channels: [{ name: "mic", unit: "Pa", data }] });
 * const f = t.columns.find((c) => c.name === "frequency_hz")!.values as Float64Array;
 * if (f.length !== 1 || Math.abs(f[0] - 1000) > 1) throw new Error(String(f));
 * ```
 */
export async function tonesAnalysis(
  source: RecordingSource,
  options: TonesOptions = {},
): Promise<TonesResult> {
  const stream = asStream(source);
  const against = options.against ?? "time";
  const criterion = options.criterion ?? "tnr";
  const minTnr = options.minTnr ?? 0;
  const rate = stream.rate;
  const block = options.block ??
    (options.resolution !== undefined
      ? Math.ceil(rate / options.resolution)
      : blockFor(rate, against === "rpm" ? 8 : 2));
  const overlap = options.overlap ?? 0.5;
  const common = {
    analysis: "tones" as const,
    against,
    standard: STANDARD,
    criterion,
    criteria_range_hz: [CRITERIA_RANGE_HZ[0], CRITERIA_RANGE_HZ[1]] as [number, number],
    safety: SAFETY_NOTE,
  };
  if (against === "time") {
    if (options.orders !== undefined && options.orders.length > 0) {
      throw new RangeError("orders go with tones against rpm");
    }
    const indices = chosenChannels(stream.channels, options, undefined);
    const channels = indices.map((i) => stream.channels[i]);
    const { estimate, warnings } = await spectralEstimateOf(stream, indices, {
      rate,
      block,
      overlap,
      window: "hann",
      detrend: "mean",
    });
    checkAutoSpectra(estimate, channels);
    const rows: Row[] = [];
    channels.forEach((c, i) => {
      for (
        const tone of findTones(estimate.auto[i], estimate.df, { minTnrDb: minTnr, criterion })
      ) {
        rows.push({
          channel: c.name,
          tone,
          frequency: tone.frequency,
          reference: referenceOf(c.unit),
        });
      }
    });
    const table = tableOf(rows, false, levelUnitOf(channels), {
      ...common,
      min_tnr_db: minTnr,
      orders: [],
      channels: channels.map((c) => ({ name: c.name, unit: c.unit })),
      ...segmentMetadata({ ...estimate, overlap }, [
        "rate_hz",
        "block",
        "df_hz",
        "overlap",
        "averages",
        "window",
        "detrend",
      ]),
      block,
      df_hz: estimate.df,
      rate_hz: rate,
      warnings,
    });
    const spectrum: Table = {
      columns: [
        { name: "frequency_hz", unit: "Hz", values: estimate.frequencies },
        ...channels.map((c, i) => ({
          name: c.name,
          unit: spectrumUnit(c.unit, "psd"),
          values: estimate.auto[i],
        })),
      ],
      metadata: { analysis: "tones spectrum", kind: "psd", window: "hann", df_hz: estimate.df },
    };
    return { table, spectrum };
  }
  const orders = options.orders ?? [];
  if (orders.length === 0) throw new RangeError("tones against rpm need the orders to follow");
  const speedName = speedChannelName(options);
  const indices = chosenChannels(stream.channels, options, speedName);
  const channels = indices.map((i) => stream.channels[i]);
  const frames = options.frames ?? 4;
  const map = await spectrogramAgainstRpm(source, {
    ...speedOptions(options),
    channels: channels.map((c) => c.name),
    block,
    overlap,
    window: "hann",
    detrend: "mean",
    frames,
    kind: "psd",
  });
  const rpmColumn = map.columns[0].values;
  const lines = Math.floor(block / 2) + 1;
  const df = rate / block;
  const rows: Row[] = [];
  channels.forEach((c, i) => {
    const values = map.columns[2 + i].values;
    for (let j = 0; j * lines < rpmColumn.length; j++) {
      const rpm = rpmColumn[j * lines];
      const density = values.subarray(j * lines, (j + 1) * lines);
      for (const order of orders) {
        const frequency = order * rpm / 60;
        const tone = frequency < rate / 2
          ? toneAt(density, df, frequency, criterion)
          : outOfBand(frequency);
        rows.push({ channel: c.name, rpm, order, tone, frequency, reference: referenceOf(c.unit) });
      }
    }
  });
  const m = map.metadata;
  const table = tableOf(rows, true, levelUnitOf(channels), {
    ...common,
    min_tnr_db: minTnr,
    orders: [...orders],
    channels: channels.map((c) => ({ name: c.name, unit: c.unit })),
    rate_hz: rate,
    block,
    df_hz: df,
    overlap,
    window: "hann",
    segments_per_step: frames,
    rpm_min: m.rpm_min,
    rpm_max: m.rpm_max,
    rpm_step: m.rpm_step,
    recorded_rpm_range: m.recorded_rpm_range,
    speed_source: speedSourceMetadata(options),
    frame_centre: m.frame_centre,
    warnings: m.warnings ?? [],
  });
  return { table };
}

/** An order above half the rate: nothing measured. */
const outOfBand = (frequency: number): Tone => ({
  frequency,
  tonePower: NaN,
  noisePower: NaN,
  tnrDb: NaN,
  prDb: NaN,
  criticalBandwidth: NaN,
  toneBandwidth: NaN,
  first: -1,
  last: -1,
  marginDb: NaN,
  prominent: false,
});

/** The speed source and steps alone, for the spectrogram against rpm. */
function speedOptions(o: TonesOptions): SpeedSource & RpmStepOptions {
  const keys = [
    "tacho",
    "rpmChannel",
    "ppr",
    "missingTeeth",
    "tachoLevel",
    "tachoHysteresis",
    "rpmMin",
    "rpmMax",
    "rpmStep",
  ] as const;
  const picked: Record<string, unknown> = {};
  for (const k of keys) if (o[k] !== undefined) picked[k] = o[k];
  return picked as SpeedSource & RpmStepOptions;
}

/** The level column's unit: the channels' shared reference, or "dB" when they differ. */
function levelUnitOf(channels: readonly { unit: string }[]): string {
  const units = [...new Set(channels.map((c) => c.unit))];
  return units.length === 1 ? levelUnit("Z", referenceOf(units[0]), units[0]) : "dB";
}
