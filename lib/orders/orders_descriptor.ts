/**
 * The order-tracking analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/** orders' side outputs (its option table spreads them in). */
export const ORDERS_OUTPUTS = {
  "rpm-out": sideOutput("json", { help: "rpm profile: time_s, rpm" }),
  "map-out": sideOutput("json", {
    help:
      "map, tidy: one row per (rpm, order) for angle or (rpm,\nfrequency_hz) for time, then one column per channel: RMS\n(or peak) per line, scaled as spectrum --kind rms (or peak)",
  }),
};

/** `quiver orders`: order tracks against rpm. */
export const ordersDescriptor: AnalysisDescriptor = {
  name: "orders",
  load: () =>
    lazyImport<typeof import("../../cli/orders.ts")>("../../cli/orders.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./orders_metadata.ts")>("./orders_metadata.ts", import.meta.url).then(
      (m) => m.ORDERS_METADATA,
    ),
  report: () =>
    lazyImport<typeof import("../report/sections/orders.ts")>(
      "../report/sections/orders.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./orders_diff.ts")>("./orders_diff.ts", import.meta.url).then((m) =>
      m.ORDERS_DIFF
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: ORDERS_OUTPUTS,
};
