/**
 * The sound level analysis (Leq, Lmax), as the command table, plans and
 * targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { LEVEL_METADATA } from "./level_metadata.ts";
import { resultMetadata } from "../io/result_metadata.ts";
import type { ResultTable } from "../io/result_file.ts";
import { finiteValue, oneChannel, type QuantityOf } from "../quantity_reading.ts";

/** The summary's `key` of `channel`, named `quantity` in messages. */
function summaryValue(
  result: ResultTable,
  { channel }: QuantityOf,
  key: "leq_db" | "lmax_db",
): { value: number } {
  const summary = resultMetadata(result, "level").summary;
  const name = oneChannel(summary.map((x) => x.channel), channel, "level summary");
  const s = summary.find((x) => x.channel === name);
  if (s === undefined) throw new Error("no level summary in the result");
  return { value: finiteValue(s[key], key) };
}

/** `quiver level`: time-weighted sound level of a recording. */
export const levelDescriptor: AnalysisDescriptor = {
  name: "level",
  load: () => import("../../cli/level.ts"),
  metadata: LEVEL_METADATA,
  report: () => import("../report/sections/level.ts"),
  diff: () => import("./level_diff.ts").then((m) => m.LEVEL_DIFF),
  plan: { step: "analysis", reads: { recording: true } },
  quantities: {
    leq_db: (result, of) => summaryValue(result, of, "leq_db"),
    lmax_db: (result, of) => summaryValue(result, of, "lmax_db"),
  },
};
