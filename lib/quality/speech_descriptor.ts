/**
 * The speech intelligibility analysis (ANSI S3.5-1997), as the command
 * table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { finiteValue, oneChannel } from "../quantity_reading.ts";
import { lazyImport } from "../lazy_import.ts";

/** speech's side output (its option table spreads it in). */
export const SPEECH_OUTPUTS = {
  "bands-out": sideOutput("json", {
    help: "per channel and band (160 Hz to 8 kHz): noise, speech and disturbance\n" +
      "spectrum levels, importance, audibility and contribution to the index",
  }),
};

/** `quiver speech`: the speech intelligibility index of cabin noise. */
export const speechDescriptor: AnalysisDescriptor = {
  name: "speech",
  load: () =>
    lazyImport<typeof import("../../cli/speech.ts")>("../../cli/speech.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./speech_metadata.ts")>("./speech_metadata.ts", import.meta.url).then(
      (m) => m.SPEECH_METADATA,
    ),
  report: () =>
    lazyImport<typeof import("../report/sections/speech.ts")>(
      "../report/sections/speech.ts",
      import.meta.url,
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: SPEECH_OUTPUTS,
  quantities: {
    sii: async (result, of) => {
      // Its schema is loaded when a target asks (the table of analyses loads at start-up).
      const { SPEECH_METADATA } = await lazyImport<typeof import("./speech_metadata.ts")>(
        "./speech_metadata.ts",
        import.meta.url,
      );
      const rows = SPEECH_METADATA.parse(result.metadata).rows;
      const name = oneChannel(rows.map((r) => r.channel), of.channel, "sii");
      const row = rows.find((r) => r.channel === name);
      if (row === undefined) throw new Error("no rows in the result");
      return { value: finiteValue(row.sii, "sii") };
    },
  },
};
