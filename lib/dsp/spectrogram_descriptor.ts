/**
 * The spectrogram analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/** `quiver spectrogram`: spectra against time or rpm. */
export const spectrogramDescriptor: AnalysisDescriptor = {
  name: "spectrogram",
  load: () =>
    lazyImport<typeof import("../../cli/spectrogram.ts")>(
      "../../cli/spectrogram.ts",
      import.meta.url,
    ),
  metadata: () =>
    lazyImport<typeof import("./spectrogram_metadata.ts")>(
      "./spectrogram_metadata.ts",
      import.meta.url,
    ).then((m) => m.SPECTROGRAM_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/spectrogram.ts")>(
      "../report/sections/spectrogram.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./spectrogram_diff.ts")>("./spectrogram_diff.ts", import.meta.url)
      .then((m) => m.SPECTROGRAM_DIFF),
  plan: { step: "analysis", reads: { recording: true } },
};
