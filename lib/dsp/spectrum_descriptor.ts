/**
 * The spectrum analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/** `quiver spectrum`: averaged spectra of a recording. */
export const spectrumDescriptor: AnalysisDescriptor = {
  name: "spectrum",
  load: () =>
    lazyImport<typeof import("../../cli/spectrum.ts")>("../../cli/spectrum.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./spectrum_metadata.ts")>("./spectrum_metadata.ts", import.meta.url)
      .then((m) => m.SPECTRUM_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/spectrum.ts")>(
      "../report/sections/spectrum.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./spectrum_diff.ts")>("./spectrum_diff.ts", import.meta.url).then((
      m,
    ) => m.SPECTRUM_DIFF),
  plan: { step: "analysis", reads: { recording: true } },
};
