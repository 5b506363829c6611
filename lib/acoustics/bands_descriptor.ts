/**
 * The fractional-octave band analysis, as the command table, plans and
 * targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { finiteValue, oneChannel } from "../quantity_reading.ts";
import { lazyImport } from "../lazy_import.ts";

// The schemas are loaded when a target asks (the table of analyses loads at start-up).
const results = () =>
  lazyImport<typeof import("../io/result_metadata.ts")>(
    "../io/result_metadata.ts",
    import.meta.url,
  );

/** `quiver bands`: octave or third-octave band levels of a recording. */
export const bandsDescriptor: AnalysisDescriptor = {
  name: "bands",
  load: () =>
    lazyImport<typeof import("../../cli/bands.ts")>("../../cli/bands.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./bands_metadata.ts")>("./bands_metadata.ts", import.meta.url).then((
      m,
    ) => m.BANDS_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/bands.ts")>(
      "../report/sections/bands.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./bands_diff.ts")>("./bands_diff.ts", import.meta.url).then((m) =>
      m.BANDS_DIFF
    ),
  plan: { step: "analysis", reads: { recording: true } },
  quantities: {
    /** The overall level of `channel`. */
    overall_db: async (result, { channel }) => {
      const { resultMetadata } = await results();
      const overall = resultMetadata(result, "bands").overall;
      const name = oneChannel(overall.map((x) => x.channel), channel, "overall level");
      const o = overall.find((x) => x.channel === name);
      if (o === undefined) throw new Error("no overall level in the result");
      return { value: finiteValue(o.level_db, "the overall level") };
    },
  },
};
