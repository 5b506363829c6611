/**
 * The impact-hammer analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/** hammer's side outputs (its option table spreads them in): the hit log is a plain CSV table. */
export const HAMMER_OUTPUTS = {
  "hits-out": sideOutput("csv", { help: "hit log CSV: hit, time_s, peak, status" }),
  "records-out": sideOutput("json", {
    help:
      "every hit's force and first response against time (CSV or\nJSON), for checking each hit by eye",
  }),
};

/** `quiver hammer`: FRFs from an impact-hammer test. */
export const hammerDescriptor: AnalysisDescriptor = {
  name: "hammer",
  load: () =>
    lazyImport<typeof import("../../cli/hammer.ts")>("../../cli/hammer.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./hammer_metadata.ts")>("./hammer_metadata.ts", import.meta.url).then(
      (m) => m.HAMMER_METADATA,
    ),
  report: () =>
    lazyImport<typeof import("../report/sections/hammer.ts")>(
      "../report/sections/hammer.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./frf_diff.ts")>("./frf_diff.ts", import.meta.url).then((m) =>
      m.FRF_DIFF
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: HAMMER_OUTPUTS,
};
