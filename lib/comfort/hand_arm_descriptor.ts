/**
 * The hand-arm vibration analysis (ISO 5349-1: a_hv, A(8)), as the command
 * table, plans and targets see it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "../analysis_descriptor.ts";
import { finiteValue } from "../quantity_reading.ts";
import { VIBRATION_OUTPUTS } from "./comfort_descriptor.ts";
import { HAND_ARM_METADATA } from "./hand_arm_metadata.ts";

/** `quiver hand-arm`: hand-arm vibration, ISO 5349-1. */
export const handArmDescriptor: AnalysisDescriptor = {
  name: "hand-arm",
  load: () => import("../../cli/hand_arm.ts"),
  metadata: HAND_ARM_METADATA,
  report: () => import("../report/sections/hand_arm.ts"),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: VIBRATION_OUTPUTS,
  quantities: {
    a_hv: (result) => ({
      value: finiteValue(HAND_ARM_METADATA.parse(result.metadata).a_hv, "a_hv"),
    }),
    a8: (result) => {
      const m = HAND_ARM_METADATA.parse(result.metadata);
      if (m.exposure_hours === null) throw new Error("A(8) needs the step's exposure-hours");
      return { value: finiteValue(m.a8, "a8") };
    },
  },
};
