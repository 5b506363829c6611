/**
 * The damping analysis (modes read off FRFs), as the command table, plans
 * and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import type { ResultTable } from "../io/result_file.ts";
import {
  finiteValue,
  oneChannel,
  type QuantityOf,
  type QuantityValue,
} from "../quantity_reading.ts";
import { formatNumber } from "../format_number.ts";
import { lazyImport } from "../lazy_import.ts";

// The rules of modes come from first_mode.ts, and the schemas from result_metadata.ts,
// loaded when a target asks (not at start-up).
const rules = () =>
  lazyImport<typeof import("./first_mode.ts")>("./first_mode.ts", import.meta.url);
const results = () =>
  lazyImport<typeof import("../io/result_metadata.ts")>(
    "../io/result_metadata.ts",
    import.meta.url,
  );

/**
 * `first_mode_hz`: the lowest numbered mode, never a candidate flagged
 * noise (the one rule of damping_analysis.ts); over every channel when none
 * is named, the channel used said in the basis with the candidates passed over.
 */
async function firstModeHz(result: ResultTable, { channel }: QuantityOf): Promise<QuantityValue> {
  const { describeSkipped, firstMode } = await rules();
  const { resultMetadata } = await results();
  const modes = resultMetadata(result, "damping").modes;
  if (channel !== undefined) oneChannel(modes.map((m) => m.channel), channel, "mode");
  const { used, skipped } = firstMode(modes, channel);
  const passedOver = describeSkipped(skipped);
  if (used === undefined) {
    throw new Error(`no mode in the result${passedOver === "" ? "" : `; ${passedOver}`}`);
  }
  const value = finiteValue(used.frequencyHz, "the mode frequency");
  return {
    value,
    basis: `judged on mode ${used.mode} of ${used.channel} at ${formatNumber(value, 5)} Hz${
      passedOver === "" ? "" : `; ${passedOver}`
    }`,
  };
}

/** `mode_hz`: mode `mode` (1-based, as numbered in the damping table) of `channel`. */
async function modeHz(result: ResultTable, { channel, mode }: QuantityOf): Promise<QuantityValue> {
  const { isMode } = await rules();
  const { resultMetadata } = await results();
  const modes = resultMetadata(result, "damping").modes;
  const name = oneChannel(modes.map((m) => m.channel), channel, "mode");
  const wanted = mode ?? 1;
  const mine = modes.filter((m) => m.channel === name && isMode(m));
  const pick = mine.find((m) => m.mode === wanted);
  if (pick === undefined) {
    throw new Error(`no mode ${wanted} in "${name}" (it has ${mine.length} mode(s))`);
  }
  const value = finiteValue(pick.frequencyHz, "the mode frequency");
  return { value, basis: `judged on mode ${wanted} of ${name} at ${formatNumber(value, 5)} Hz` };
}

/** `quiver damping`: modes and damping of an frf or hammer result. */
export const dampingDescriptor: AnalysisDescriptor = {
  name: "damping",
  load: () =>
    lazyImport<typeof import("../../cli/damping.ts")>("../../cli/damping.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./damping_metadata.ts")>("./damping_metadata.ts", import.meta.url)
      .then((m) => m.DAMPING_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/damping.ts")>(
      "../report/sections/damping.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./mode_values.ts")>("./mode_values.ts", import.meta.url).then((m) =>
      m.MODE_DIFF
    ),
  plan: {
    step: "analysis",
    reads: {
      results: {
        key: "input",
        from: ["frf", "hammer"],
        output: "out",
        missing: "damping needs the id of an frf or hammer analysis",
      },
      recording: false,
    },
  },
  quantities: { first_mode_hz: firstModeHz, mode_hz: modeHz },
};
