/**
 * The modal fit, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/** modal's side outputs (its option table spreads them in). */
export const MODAL_OUTPUTS = {
  "shapes-out": sideOutput("json", {
    help: "shapes, tidy: mode, point, direction, re, im, frequency_hz",
  }),
  "stability-out": sideOutput("json", {
    help:
      "poles per order: order, frequency_hz, damping_ratio,\nstable_frequency, stable_damping, stable_shape, mode",
  }),
  "synth-out": sideOutput("json", {
    help: "measured and synthesised FRFs (as receptance) per point",
  }),
};

/** `quiver modal`: modes fitted to the FRFs of several frf or hammer results. */
export const modalDescriptor: AnalysisDescriptor = {
  name: "modal",
  load: () =>
    lazyImport<typeof import("../../cli/modal.ts")>("../../cli/modal.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./modal_metadata.ts")>("./modal_metadata.ts", import.meta.url).then((
      m,
    ) => m.MODAL_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/modal.ts")>(
      "../report/sections/modal.ts",
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
        key: "inputs",
        inputOrInputs: true,
        from: ["frf", "hammer"],
        output: "out",
        missing: "modal needs the ids of frf or hammer analyses",
      },
      // The test geometry (point, x, y, z, line_to) for the report's shape drawings.
      files: [{ key: "geometry", option: "geometry" }],
      recording: false,
    },
  },
  outputs: MODAL_OUTPUTS,
};
