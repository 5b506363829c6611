/**
 * The test-against-simulation comparison, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/** compare's side outputs (its option table spreads them in). */
export const COMPARE_OUTPUTS = {
  "summary-out": sideOutput("json", {
    help:
      "JSON summary: frac, peaks (test_hz, simulation_hz,\nshift_percent, level_difference_db, coarse, note),\ntest_only_peaks, simulation_only_peaks, bands, grid, quantity",
  }),
};

/** `quiver compare`: a test curve against a simulation; a plan's comparisons. */
export const compareDescriptor: AnalysisDescriptor = {
  name: "compare",
  load: () =>
    lazyImport<typeof import("../../cli/compare.ts")>("../../cli/compare.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./compare_metadata.ts")>("./compare_metadata.ts", import.meta.url)
      .then((m) => m.COMPARE_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/compare.ts")>(
      "../report/sections/compare.ts",
      import.meta.url,
    ),
  plan: { step: "comparison" },
  outputs: COMPARE_OUTPUTS,
};
