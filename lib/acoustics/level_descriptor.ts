/**
 * The sound level analysis (Leq, Lmax), as the command table, plans and
 * targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import type { ResultTable } from "../io/result_file.ts";
import { finiteValue, oneChannel, type QuantityOf } from "../quantity_reading.ts";
import { lazyImport } from "../lazy_import.ts";

// The schemas are loaded when a target asks (the table of analyses loads at start-up).
const results = () =>
  lazyImport<typeof import("../io/result_metadata.ts")>(
    "../io/result_metadata.ts",
    import.meta.url,
  );

/** The summary's `key` of `channel`, named `quantity` in messages. */
async function summaryValue(
  result: ResultTable,
  { channel }: QuantityOf,
  key: "leq_db" | "lmax_db",
): Promise<{ value: number }> {
  const { resultMetadata } = await results();
  const summary = resultMetadata(result, "level").summary;
  const name = oneChannel(summary.map((x) => x.channel), channel, "level summary");
  const s = summary.find((x) => x.channel === name);
  if (s === undefined) throw new Error("no level summary in the result");
  return { value: finiteValue(s[key], key) };
}

/** `quiver level`: time-weighted sound level of a recording. */
export const levelDescriptor: AnalysisDescriptor = {
  name: "level",
  load: () =>
    lazyImport<typeof import("../../cli/level.ts")>("../../cli/level.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./level_metadata.ts")>("./level_metadata.ts", import.meta.url).then((
      m,
    ) => m.LEVEL_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/level.ts")>(
      "../report/sections/level.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./level_diff.ts")>("./level_diff.ts", import.meta.url).then((m) =>
      m.LEVEL_DIFF
    ),
  plan: { step: "analysis", reads: { recording: true } },
  quantities: {
    leq_db: (result, of) => summaryValue(result, of, "leq_db"),
    lmax_db: (result, of) => summaryValue(result, of, "lmax_db"),
  },
};
