/**
 * quiver: a toolkit for vehicle noise-and-vibration test data.
 *
 * Data flow: a reader gives a {@linkcode Recording} (rate, channels with
 * name, unit and samples); the spectral core turns channels into averaged
 * auto and cross spectra; analyses turn those into tables; writers put
 * tables into CSV or JSON files atomically.
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
export * from "./lib/errors.ts";
export * from "./lib/choices.ts";
export * from "./lib/io/recording.ts";
export * from "./lib/io/numbers.ts";
export * from "./lib/io/csv_table.ts";
export * from "./lib/io/csv_reader.ts";
export * from "./lib/io/wav.ts";
export * from "./lib/io/channel_setup.ts";
export * from "./lib/io/read_recording.ts";
export * from "./lib/io/recording_stream.ts";
export * from "./lib/io/signal_checks.ts";
export * from "./lib/io/table.ts";
export * from "./lib/io/atomic_write.ts";
export * from "./lib/dsp/fft.ts";
export * from "./lib/dsp/windows.ts";
export * from "./lib/dsp/detrend.ts";
export * from "./lib/dsp/spectral_core.ts";
export * from "./lib/dsp/spectrum_kinds.ts";
export * from "./lib/dsp/averaged_spectrum.ts";
export * from "./lib/frf/estimators.ts";
export * from "./lib/frf/forms.ts";
export * from "./lib/frf/frf_table.ts";
export * from "./lib/frf/frf_analysis.ts";
export * from "./lib/frf/hits.ts";
export * from "./lib/frf/hammer.ts";
export * from "./lib/modal/nelder_mead.ts";
export * from "./lib/modal/peaks.ts";
export * from "./lib/modal/half_power.ts";
export * from "./lib/modal/sdof_fit.ts";
export * from "./lib/modal/frf_input.ts";
export * from "./lib/modal/damping_analysis.ts";
export * from "./lib/acoustics/biquad.ts";
export * from "./lib/acoustics/weighting.ts";
export * from "./lib/acoustics/bands.ts";
export * from "./lib/acoustics/band_synthesis.ts";
export * from "./lib/acoustics/filter_bank.ts";
export * from "./lib/acoustics/levels.ts";
export * from "./lib/acoustics/time_weighting.ts";
export * from "./lib/acoustics/band_analysis.ts";
export * from "./lib/acoustics/level_analysis.ts";
export * from "./lib/acoustics/calibration.ts";
export * from "./lib/orders/tacho.ts";
export * from "./lib/orders/angle_resample.ts";
export * from "./lib/orders/order_tracking.ts";
export * from "./lib/compare/curve_input.ts";
export * from "./lib/compare/align.ts";
export * from "./lib/compare/frac.ts";
export * from "./lib/compare/peak_match.ts";
export * from "./lib/compare/comparison.ts";
export * from "./lib/compare/targets.ts";
export * from "./lib/version.ts";
export * from "./lib/plan/schema.ts";
export * from "./lib/plan/progress.ts";
export * from "./lib/plan/target_eval.ts";
export * from "./lib/plan/runner.ts";
export * from "./lib/report/svg_plot.ts";
export * from "./lib/report/html_report.ts";
