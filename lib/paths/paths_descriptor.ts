/**
 * The transfer-path analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { PATHS_METADATA } from "./paths_metadata.ts";

/** paths' side outputs (its option table spreads them in). */
export const PATHS_OUTPUTS = {
  "bands-out": sideOutput("json", {
    help: "per-band levels of every path, their sum and the target",
  }),
};

/** `quiver paths`: each path's contribution to a target, from operating data and transfers. */
export const pathsDescriptor: AnalysisDescriptor = {
  name: "paths",
  load: () => import("../../cli/paths.ts"),
  metadata: PATHS_METADATA,
  report: () => import("../report/sections/paths.ts"),
  plan: {
    step: "analysis",
    reads: {
      // Each path's transfer, in the order of the references.
      results: {
        key: "inputs",
        from: ["frf", "hammer"],
        output: "out",
        option: "transfer",
        missing:
          "paths needs the ids of the frf or hammer analyses holding each path's transfer, one per reference",
      },
      recording: true,
    },
  },
  outputs: PATHS_OUTPUTS,
};
