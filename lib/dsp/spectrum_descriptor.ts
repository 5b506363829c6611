/**
 * The spectrum analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { SPECTRUM_METADATA } from "./spectrum_metadata.ts";

/** `quiver spectrum`: averaged spectra of a recording. */
export const spectrumDescriptor: AnalysisDescriptor = {
  name: "spectrum",
  load: () => import("../../cli/spectrum.ts"),
  metadata: SPECTRUM_METADATA,
  report: () => import("../report/sections/spectrum.ts"),
  diff: () => import("./spectrum_diff.ts").then((m) => m.SPECTRUM_DIFF),
  plan: { step: "analysis", reads: { recording: true } },
};
