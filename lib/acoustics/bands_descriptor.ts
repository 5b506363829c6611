/**
 * The fractional-octave band analysis, as the command table, plans and
 * targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { BANDS_METADATA } from "./bands_metadata.ts";
import { resultMetadata } from "../io/result_metadata.ts";
import { finiteValue, oneChannel } from "../quantity_reading.ts";

/** `quiver bands`: octave or third-octave band levels of a recording. */
export const bandsDescriptor: AnalysisDescriptor = {
  name: "bands",
  load: () => import("../../cli/bands.ts"),
  metadata: BANDS_METADATA,
  report: () => import("../report/sections/bands.ts"),
  diff: () => import("./bands_diff.ts").then((m) => m.BANDS_DIFF),
  plan: { step: "analysis", reads: { recording: true } },
  quantities: {
    /** The overall level of `channel`. */
    overall_db: (result, { channel }) => {
      const overall = resultMetadata(result, "bands").overall;
      const name = oneChannel(overall.map((x) => x.channel), channel, "overall level");
      const o = overall.find((x) => x.channel === name);
      if (o === undefined) throw new Error("no overall level in the result");
      return { value: finiteValue(o.level_db, "the overall level") };
    },
  },
};
