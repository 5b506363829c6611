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
export {
  HistoryStore,
  openHistory,
  type RunLabels,
  type RunSummary,
  type TrendPoint,
} from "./lib/history/history_store.ts";
export { readRunRecord, type RunRecord } from "./lib/history/run_record.ts";
