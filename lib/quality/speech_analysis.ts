/**
 * The speech intelligibility index (ANSI S3.5-1997, sii.ts) of cabin noise
 * recorded by microphones: the analysis behind `quiver speech`. The noise's
 * one-third octave band levels, 160 Hz to 8 kHz, come from the band analysis
 * (lib/acoustics/band_analysis.ts: the spectral core's averaged PSD, read
 * chunk by chunk, memory flat in the record's length), Z-weighted, and are
 * turned into spectrum levels by each band's width.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import type { ColumnValues, Table } from "../io/table.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import { bandLevels } from "../acoustics/band_analysis.ts";
import { bandHolding } from "../acoustics/bands.ts";
import { spectrumLevel, speechIntelligibilityIndex } from "./sii.ts";
import { SII_BANDS, SII_STANDARD } from "./sii_tables.ts";
import type { SpeechMetadata } from "./speech_metadata.ts";

/** What every speech result, its help and README say of the index. */
export const SPEECH_NOTE =
  "Engineering comparison between cabins, builds and targets, not a certified assessment of " +
  "speech intelligibility or of a workplace or warning-signal requirement; for those, defer " +
  "to local regulations and licensed practice.";

/**
 * The least sample rate: the 8 kHz band's upper edge must lie below half
 * the rate (IEC 61260-1 band edges, lib/acoustics/bands.ts), Hz.
 *
 * @example
 * ```ts
 * import { SPEECH_LEAST_RATE_HZ } from "./speech_analysis.ts";
 * if (Math.round(SPEECH_LEAST_RATE_HZ) !== 17825) throw new Error();
 * ```
 */
export const SPEECH_LEAST_RATE_HZ = 2 * bandHolding(8000, 3).upperHz;

/** Options of {@linkcode speechAnalysis}. */
export interface SpeechOptions {
  /** Microphone channels, in Pa. Default: every channel whose unit is Pa. */
  readonly channels?: readonly string[];
}

/** The index per channel, the per-band side table and the warnings. */
export interface SpeechResult {
  /** channel, sii: one row per channel. */
  readonly table: Table<SpeechMetadata, ColumnValues>;
  /** Per channel and band: the noise, the speech, the disturbance and the band's contribution. */
  readonly bands: Table<Record<string, unknown>, ColumnValues>;
  readonly warnings: readonly string[];
}

/**
 * The speech intelligibility index of each microphone channel's noise.
 *
 * @throws {QuiverError} for a channel not in Pa, no channel in Pa, a rate
 * too low for the 8 kHz band (naming the least rate), or a record too short.
 *
 * @example
 * ```ts
 * import { speechAnalysis } from "./speech_analysis.ts";
 * // Near silence (1 µPa r.m.s. noise): only the internal noise of Table 3 limits the index.
 * let s = 1;
 * const noise = new Float64Array(48000).map(() => ((s = (s * 16807) % 2147483647) / 2147483647 - 0.5) * 3.5e-6);
 * const r = await speechAnalysis({ rate: 24000, startTime: 0, channels: [{ name: "mic", unit: "Pa", data: noise }] });
 * if (!(r.table.metadata.rows[0].sii! > 0.99)) throw new Error();
 * ```
 */
export async function speechAnalysis(
  source: RecordingSource,
  options: SpeechOptions = {},
): Promise<SpeechResult> {
  const stream = asStream(source);
  const names = options.channels ??
    stream.channels.filter((c) => c.unit === "Pa").map((c) => c.name);
  if (names.length === 0) {
    throw new QuiverError(
      `no channel in Pa: the speech intelligibility index needs sound pressure (microphones); ` +
        `the recording has ${stream.channels.map((c) => `"${c.name}" [${c.unit}]`).join(", ")}`,
    );
  }
  for (const name of names) {
    const c = stream.channels.find((ch) => ch.name === name);
    if (c !== undefined && c.unit !== "Pa") {
      throw new QuiverError(
        `channel "${name}" is in ${c.unit === "" ? "no unit" : c.unit}, not Pa: ` +
          `the speech intelligibility index needs sound pressure`,
        {},
        "usage",
      );
    }
  }
  if (!(stream.rate > SPEECH_LEAST_RATE_HZ)) {
    throw new QuiverError(
      `the speech intelligibility index needs a sample rate above ${
        formatNumber(SPEECH_LEAST_RATE_HZ, 6)
      } Hz (the 8 kHz band's upper edge below half the rate), got ${
        formatNumber(stream.rate, 6)
      } Hz`,
    );
  }
  const levels = await bandLevels(stream, {
    channels: names,
    fraction: 3,
    weighting: "Z",
    minHz: SII_BANDS[0].centerHz,
    maxHz: SII_BANDS[SII_BANDS.length - 1].centerHz,
  });
  const [, nominal, lower, upper] = levels.table.columns.map((c) => c.values as Float64Array);
  if (nominal.length !== SII_BANDS.length || nominal.some((f, i) => f !== SII_BANDS[i].centerHz)) {
    throw new Error(
      `the band analysis gave bands ${Array.from(nominal).join(", ")}, not Table 3's`,
    );
  }
  const width = Float64Array.from(lower, (l, i) => upper[i] - l);
  const rows: { channel: string; sii: number | null }[] = [];
  const tidy = {
    channel: [] as string[],
    center: [] as number[],
    band: [] as number[],
    noise: [] as number[],
    speech: [] as number[],
    disturbance: [] as number[],
    importance: [] as number[],
    audibility: [] as number[],
    contribution: [] as number[],
  };
  names.forEach((channel, c) => {
    const bandDb = levels.table.columns[4 + c].values as Float64Array;
    const noise = Float64Array.from(bandDb, (l, i) => spectrumLevel(l, width[i]));
    const r = speechIntelligibilityIndex(noise);
    rows.push({ channel, sii: r.sii });
    SII_BANDS.forEach((b, i) => {
      tidy.channel.push(channel);
      tidy.center.push(b.centerHz);
      tidy.band.push(bandDb[i]);
      tidy.noise.push(noise[i]);
      tidy.speech.push(b.speechDb);
      tidy.disturbance.push(r.disturbanceDb[i]);
      tidy.importance.push(b.importance);
      tidy.audibility.push(r.audibility[i]);
      tidy.contribution.push(r.contribution[i]);
    });
  });
  const f64 = (v: number[]) => Float64Array.from(v);
  const level = "dB re 20 µPa";
  const perHz = "dB re 20 µPa/Hz";
  return {
    warnings: levels.warnings,
    table: {
      columns: [
        { name: "channel", unit: "", values: names.slice() },
        { name: "sii", unit: "", values: Float64Array.from(rows, (r) => r.sii ?? NaN) },
      ],
      metadata: {
        analysis: "speech",
        standard: SII_STANDARD,
        speech_spectrum: "standard speech spectrum, normal vocal effort",
        hearing: "hearing threshold levels 0 dB HL in every band",
        rate_hz: stream.rate,
        band_levels: levels.table.metadata,
        rows,
        safety: SPEECH_NOTE,
        warnings: [...levels.warnings],
      },
    },
    bands: {
      columns: [
        { name: "channel", unit: "", values: tidy.channel },
        { name: "center_hz", unit: "", values: f64(tidy.center) },
        { name: "noise_band", unit: level, values: f64(tidy.band) },
        { name: "noise_spectrum", unit: perHz, values: f64(tidy.noise) },
        { name: "speech_spectrum", unit: perHz, values: f64(tidy.speech) },
        { name: "disturbance_spectrum", unit: perHz, values: f64(tidy.disturbance) },
        { name: "importance", unit: "", values: f64(tidy.importance) },
        { name: "audibility", unit: "", values: f64(tidy.audibility) },
        { name: "contribution", unit: "", values: f64(tidy.contribution) },
      ],
      metadata: { analysis: "speech_bands", standard: SII_STANDARD },
    },
  };
}
