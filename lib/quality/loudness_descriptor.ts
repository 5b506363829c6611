/**
 * The loudness analysis (ISO 532-1 loudness, DIN 45692 sharpness), as the
 * command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import type { ResultTable } from "../io/result_file.ts";
import { finiteValue, oneChannel, type QuantityOf } from "../quantity_reading.ts";
import { lazyImport } from "../lazy_import.ts";

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

// Its schema is loaded when a target asks (the table of analyses loads at start-up).
const read =
  (key: "loudness" | "n5" | "sharpness") => async (result: ResultTable, of: QuantityOf) => {
    const { LOUDNESS_METADATA } = await lazyImport<typeof import("./loudness_metadata.ts")>(
      "./loudness_metadata.ts",
      import.meta.url,
    );
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
  load: () =>
    lazyImport<typeof import("../../cli/loudness.ts")>("../../cli/loudness.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./loudness_metadata.ts")>("./loudness_metadata.ts", import.meta.url)
      .then((m) => m.LOUDNESS_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/loudness.ts")>(
      "../report/sections/loudness.ts",
      import.meta.url,
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: LOUDNESS_OUTPUTS,
  quantities: {
    loudness_sone: read("loudness"),
    n5_sone: read("n5"),
    sharpness_acum: read("sharpness"),
  },
};
