/**
 * The transfer-path analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/** paths' side outputs (its option table spreads them in). */
export const PATHS_OUTPUTS = {
  "bands-out": sideOutput("json", {
    help: "per-band levels of every path, their sum and the target",
  }),
};

/** `quiver paths`: each path's contribution to a target, from operating data and transfers. */
export const pathsDescriptor: AnalysisDescriptor = {
  name: "paths",
  load: () =>
    lazyImport<typeof import("../../cli/paths.ts")>("../../cli/paths.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./paths_metadata.ts")>("./paths_metadata.ts", import.meta.url).then((
      m,
    ) => m.PATHS_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/paths.ts")>(
      "../report/sections/paths.ts",
      import.meta.url,
    ),
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
