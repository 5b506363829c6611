/**
 * quiver: a toolkit for vehicle noise-and-vibration test data.
 *
 * Data flow: a reader opens a recording (a file's stream, or a recording in
 * memory as the simplest source); analyses read it chunk by chunk through
 * the one spectral core into tables; writers put tables into CSV (with a
 * verifiable sidecar) or JSON files atomically. Entry points per area:
 * `lib/io/mod.ts`, `lib/dsp/mod.ts`, `lib/frf/mod.ts`, `lib/modal/mod.ts`,
 * `lib/acoustics/mod.ts`, `lib/orders/mod.ts`, `lib/compare/mod.ts`, `lib/comfort/mod.ts`.
 *
 * @example
 * ```ts
 * import { averagedSpectrum, parseCsvRecording } from "./mod.ts";
 * const rows = Array.from({ length: 1024 }, (_, i) => `${i / 1024},${Math.sin(2 * Math.PI * 64 * i / 1024)}`);
 * const recording = parseCsvRecording(`time_s,mount_acc [m/s^2]\n${rows.join("\n")}\n`);
 * const table = await averagedSpectrum(recording, { block: 256, kind: "peak", window: "flattop" });
 * const peak = table.columns[1].values.reduce((a, v) => Math.max(a, v), 0);
 * if (Math.abs(peak - 1) > 0.005) throw new Error();
 * ```
 *
 * @module
 */
// A chosen list per area; each area is also its own entry point (lib/<area>/mod.ts), so
// that a signal-processing script does not load the campaign runner or the report.
export * from "./lib/io/mod.ts";
export * from "./lib/dsp/mod.ts";
export * from "./lib/frf/mod.ts";
export * from "./lib/modal/mod.ts";
export * from "./lib/acoustics/mod.ts";
export * from "./lib/orders/mod.ts";
export * from "./lib/compare/mod.ts";
export * from "./lib/comfort/mod.ts";
export { QUIVER_VERSION } from "./lib/version.ts";
export { runPlan } from "./lib/plan/runner.ts";
export { type Plan, planSchema } from "./lib/plan/schema.ts";
export { type Manifest, manifestSchema } from "./lib/plan/manifest.ts";
export { writeReport } from "./lib/report/html_report.ts";
export { SII_BANDS, SII_STANDARD, type SiiBand } from "./lib/quality/sii_tables.ts";
export {
  type SiiOptions,
  type SiiResult,
  spectrumLevel,
  speechIntelligibilityIndex,
} from "./lib/quality/sii.ts";
export {
  SPEECH_LEAST_RATE_HZ,
  SPEECH_NOTE,
  speechAnalysis,
  type SpeechOptions,
  type SpeechResult,
} from "./lib/quality/speech_analysis.ts";
// Loudness (ISO 532-1) and sharpness (DIN 45692): lib/quality/ has no mod.ts of its own yet.
export {
  LOUDNESS_METHODS,
  LOUDNESS_SAFETY_NOTE,
  loudnessAnalysis,
  type LoudnessMethod,
  type LoudnessOptions,
  type LoudnessResult,
} from "./lib/quality/loudness_analysis.ts";
export {
  coreLoudness,
  loudnessLevel,
  SOUND_FIELDS,
  type SoundField,
  specificLoudness,
} from "./lib/quality/zwicker_core.ts";
export {
  loudnessOfLevels,
  type LoudnessValues,
  StationaryBandMeter,
} from "./lib/quality/loudness_stationary.ts";
export {
  TimeVaryingLoudnessMeter,
  type TimeVaryingOptions,
  type TimeVaryingValues,
} from "./lib/quality/loudness_time_varying.ts";
export { sharpness, sharpnessWeighting } from "./lib/quality/sharpness.ts";
export { LOUDNESS_BANDS } from "./lib/quality/loudness_bands.ts";
// Tonal prominence (ECMA-418-1), lib/quality/ (shared with other sound-quality helpers).
export {
  bandAbove,
  bandBelow,
  bandPower,
  criticalBand,
  criticalBandwidth,
} from "./lib/quality/critical_band.ts";
export { type ToneMeasure, toneToNoise } from "./lib/quality/tone_to_noise.ts";
export { prominenceBands, prominenceRatio } from "./lib/quality/prominence_ratio.ts";
export { prCriterion, tnrCriterion } from "./lib/quality/tones_criteria.ts";
export { findTones, type Tone, toneAt } from "./lib/quality/tones_search.ts";
export { tonesAnalysis, type TonesOptions } from "./lib/quality/tones_analysis.ts";
export { diffRuns } from "./lib/history/run_diff.ts";
export type { DiffOptions, DiffSummary, RunDiff } from "./lib/history/run_diff.ts";
export { writeRunDiff } from "./lib/history/run_diff_write.ts";
export {
  equivalentDegreesOfFreedom,
  frfChangeInterval,
  frfRandomError,
  powerRatioInterval,
} from "./lib/history/confidence_intervals.ts";
export { fCdf, fQuantile, normalQuantile } from "./lib/history/confidence_distributions.ts";
export {
  HistoryStore,
  openHistory,
  type RunLabels,
  type RunSummary,
  type TrendPoint,
} from "./lib/history/history_store.ts";
export { readRunRecord, type RunRecord } from "./lib/history/run_record.ts";
