/**
 * The spectrogram analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { RESULT_METADATA } from "../io/result_metadata.ts";

/** `quiver spectrogram`: spectra against time or rpm. */
export const spectrogramDescriptor: AnalysisDescriptor = {
  name: "spectrogram",
  load: () => import("../../cli/spectrogram.ts"),
  metadata: RESULT_METADATA.spectrogram,
  plan: { step: "analysis", reads: { recording: true } },
};
