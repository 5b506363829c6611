/**
 * The test-against-simulation comparison, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { COMPARE_METADATA } from "./compare_metadata.ts";

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
  load: () => import("../../cli/compare.ts"),
  metadata: COMPARE_METADATA,
  report: () => import("../report/sections/compare.ts"),
  plan: { step: "comparison" },
  outputs: COMPARE_OUTPUTS,
};
