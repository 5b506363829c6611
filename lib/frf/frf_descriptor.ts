/**
 * The FRF analysis, as the command table, plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput, type StepOptions } from "../analysis_descriptor.ts";
import { lazyImport } from "../lazy_import.ts";

/**
 * Whether a step's `inputs` option names two or more channels (a list, or
 * "a,b" text): only then are the multiple-input outputs written.
 *
 * @example
 * ```ts
 * import { severalInputs } from "./frf_descriptor.ts";
 * if (!severalInputs({ inputs: "a,b" }) || severalInputs({ inputs: ["a"] }) || severalInputs({})) throw new Error();
 * ```
 */
export function severalInputs(options: StepOptions): boolean {
  const value = options.inputs;
  if (Array.isArray(value)) return value.length > 1;
  return typeof value === "string" && value.split(",").length > 1;
}

/** frf's side outputs, written with several inputs only (its option table spreads them in). */
export const FRF_OUTPUTS = {
  "partial-out": sideOutput("json", {
    help: "with --inputs: partial coherences and conditioned spectra",
    onlyWith: severalInputs,
  }),
  "principal-out": sideOutput("json", {
    help:
      "with --inputs: principal components of the inputs (eigenvalues\nof Gxx) and virtual coherences",
    onlyWith: severalInputs,
  }),
};

/** `quiver frf`: frequency response functions of a recording. */
export const frfDescriptor: AnalysisDescriptor = {
  name: "frf",
  load: () => lazyImport<typeof import("../../cli/frf.ts")>("../../cli/frf.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./frf_metadata.ts")>("./frf_metadata.ts", import.meta.url).then((m) =>
      m.FRF_METADATA
    ),
  report: () =>
    lazyImport<typeof import("../report/sections/frf.ts")>(
      "../report/sections/frf.ts",
      import.meta.url,
    ),
  diff: () =>
    lazyImport<typeof import("./frf_diff.ts")>("./frf_diff.ts", import.meta.url).then((m) =>
      m.FRF_DIFF
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: FRF_OUTPUTS,
};
