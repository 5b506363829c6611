/**
 * The hand-arm vibration analysis (ISO 5349-1: a_hv, A(8)), as the command
 * table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { finiteValue } from "../quantity_reading.ts";
import { VIBRATION_OUTPUTS } from "./comfort_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

// Its schema is loaded when asked for (the table of analyses loads at start-up).
const schema = () =>
  lazyImport<typeof import("./hand_arm_metadata.ts")>("./hand_arm_metadata.ts", import.meta.url)
    .then((m) => m.HAND_ARM_METADATA);

/** `quiver hand-arm`: hand-arm vibration, ISO 5349-1. */
export const handArmDescriptor: AnalysisDescriptor = {
  name: "hand-arm",
  load: () =>
    lazyImport<typeof import("../../cli/hand_arm.ts")>("../../cli/hand_arm.ts", import.meta.url),
  metadata: schema,
  report: () =>
    lazyImport<typeof import("../report/sections/hand_arm.ts")>(
      "../report/sections/hand_arm.ts",
      import.meta.url,
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: VIBRATION_OUTPUTS,
  quantities: {
    a_hv: async (result) => ({
      value: finiteValue((await schema()).parse(result.metadata).a_hv, "a_hv"),
    }),
    a8: async (result) => {
      const m = (await schema()).parse(result.metadata);
      if (m.exposure_hours === null) throw new Error("A(8) needs the step's exposure-hours");
      return { value: finiteValue(m.a8, "a8") };
    },
  },
};
