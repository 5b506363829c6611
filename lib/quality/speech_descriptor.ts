/**
 * The speech intelligibility analysis (ANSI S3.5-1997), as the command
 * table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { finiteValue, oneChannel } from "../quantity_reading.ts";
import { SPEECH_METADATA } from "./speech_metadata.ts";

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
  load: () => import("../../cli/speech.ts"),
  metadata: SPEECH_METADATA,
  report: () => import("../report/sections/speech.ts"),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: SPEECH_OUTPUTS,
  quantities: {
    sii: (result, of) => {
      const rows = SPEECH_METADATA.parse(result.metadata).rows;
      const name = oneChannel(rows.map((r) => r.channel), of.channel, "sii");
      const row = rows.find((r) => r.channel === name);
      if (row === undefined) throw new Error("no rows in the result");
      return { value: finiteValue(row.sii, "sii") };
    },
  },
};
