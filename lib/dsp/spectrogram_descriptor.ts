/**
 * The spectrogram analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { SPECTROGRAM_METADATA } from "./spectrogram_metadata.ts";

/** `quiver spectrogram`: spectra against time or rpm. */
export const spectrogramDescriptor: AnalysisDescriptor = {
  name: "spectrogram",
  load: () => import("../../cli/spectrogram.ts"),
  metadata: SPECTROGRAM_METADATA,
  report: () => import("../report/sections/spectrogram.ts"),
  diff: () => import("./spectrogram_diff.ts").then((m) => m.SPECTROGRAM_DIFF),
  plan: { step: "analysis", reads: { recording: true } },
};
