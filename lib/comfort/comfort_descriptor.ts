/**
 * The whole-body vibration analysis (ISO 2631-1: a_w, MTVV, VDV, the vector
 * sum), as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import type { ResultTable } from "../io/result_file.ts";
import { finiteValue, oneChannel, type QuantityOf } from "../quantity_reading.ts";
import { lazyImport } from "../lazy_import.ts";

/** comfort's and hand-arm's side outputs (their option tables spread them in). */
export const VIBRATION_OUTPUTS = {
  "history-out": sideOutput("json", {
    help:
      "running r.m.s. (τ = 1 s) against time, every 0.1 s:\ntime_s, then one column per channel or axis",
  }),
};

/**
 * The row named by `of.channel` (a channel, or an axis: x, y, z, sum), or
 * the only row, and its value `key`.
 */
export function rowValue(
  rows: readonly { axis: string; channel: string; [key: string]: unknown }[],
  { channel }: QuantityOf,
  key: "aw" | "mtvv" | "vdv",
): { value: number } {
  const names = rows.map((r) => r.axis === "" ? r.channel : r.axis);
  const name = oneChannel(names, channel, key);
  const row = rows[names.indexOf(name!)];
  if (row === undefined) throw new Error("no rows in the result");
  return { value: finiteValue(row[key], key) };
}

// Its schema is loaded when a target asks (the table of analyses loads at start-up).
const read = (key: "aw" | "mtvv" | "vdv") => async (result: ResultTable, of: QuantityOf) => {
  const { COMFORT_METADATA } = await lazyImport<typeof import("./comfort_metadata.ts")>(
    "./comfort_metadata.ts",
    import.meta.url,
  );
  return rowValue(COMFORT_METADATA.parse(result.metadata).rows, of, key);
};

/** `quiver comfort`: whole-body vibration, ISO 2631-1. */
export const comfortDescriptor: AnalysisDescriptor = {
  name: "comfort",
  load: () =>
    lazyImport<typeof import("../../cli/comfort.ts")>("../../cli/comfort.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./comfort_metadata.ts")>("./comfort_metadata.ts", import.meta.url)
      .then((m) => m.COMFORT_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/comfort.ts")>(
      "../report/sections/comfort.ts",
      import.meta.url,
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: VIBRATION_OUTPUTS,
  quantities: { aw: read("aw"), mtvv: read("mtvv"), vdv: read("vdv") },
};
