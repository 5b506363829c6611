/**
 * The loudness analysis (ISO 532-1 loudness, DIN 45692 sharpness), as the
 * command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import type { ResultTable } from "../io/result_file.ts";
import { finiteValue, oneChannel, type QuantityOf } from "../quantity_reading.ts";
import { LOUDNESS_METADATA } from "./loudness_metadata.ts";

/** loudness's side outputs (its option table spreads them in). */
export const LOUDNESS_OUTPUTS = {
  "specific-out": sideOutput("json", {
    help: "specific loudness N′ against Bark, tidy:\nchannel, z, specific_loudness " +
      "(time-averaged\nwhen time-varying)",
  }),
  "history-out": sideOutput("json", {
    help: "time-varying only: N and sharpness every 2 ms:\ntime_s, then per channel CH " +
      "[sone] and\nCH:sharpness [acum]",
    onlyWith: (options) => options.method === "time-varying",
  }),
};

const read = (key: "loudness" | "n5" | "sharpness") => (result: ResultTable, of: QuantityOf) => {
  const rows = LOUDNESS_METADATA.parse(result.metadata).rows;
  const name = oneChannel(rows.map((r) => r.channel), of.channel, key);
  const row = rows.find((r) => r.channel === name);
  if (row === undefined) throw new Error("no rows in the result");
  if (
    key === "n5" && row.n5 === null &&
    LOUDNESS_METADATA.parse(result.metadata).method !== "time-varying"
  ) {
    throw new Error("n5_sone needs the step's method time-varying");
  }
  return { value: finiteValue(row[key], key) };
};

/** `quiver loudness`: loudness (ISO 532-1) and sharpness (DIN 45692) of microphone channels. */
export const loudnessDescriptor: AnalysisDescriptor = {
  name: "loudness",
  load: () => import("../../cli/loudness.ts"),
  metadata: LOUDNESS_METADATA,
  report: () => import("../report/sections/loudness.ts"),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: LOUDNESS_OUTPUTS,
  quantities: {
    loudness_sone: read("loudness"),
    n5_sone: read("n5"),
    sharpness_acum: read("sharpness"),
  },
};
