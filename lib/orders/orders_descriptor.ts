/**
 * The order-tracking analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { ORDERS_METADATA } from "./orders_metadata.ts";

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
  load: () => import("../../cli/orders.ts"),
  metadata: ORDERS_METADATA,
  report: () => import("../report/sections/orders.ts"),
  diff: () => import("./orders_diff.ts").then((m) => m.ORDERS_DIFF),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: ORDERS_OUTPUTS,
};
