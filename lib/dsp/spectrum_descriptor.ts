/**
 * The spectrum analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { RESULT_METADATA } from "../io/result_metadata.ts";

/** `quiver spectrum`: averaged spectra of a recording. */
export const spectrumDescriptor: AnalysisDescriptor = {
  name: "spectrum",
  load: () => import("../../cli/spectrum.ts"),
  metadata: RESULT_METADATA.spectrum,
  plan: { step: "analysis", reads: { recording: true } },
};
