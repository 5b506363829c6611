/**
 * THE table of quiver's analyses: one line per analysis, each a descriptor
 * kept beside the analysis's code (lib/analysis_descriptor.ts says what one
 * holds). The command table (cli/commands.ts), the plan schema, the plan
 * runner and the targets all loop over it; adding an analysis is its folder
 * and one line here.
 *
 * The order is that of the plan's messages: the commands a plan can run and
 * the target quantities are listed in it.
 *
 * @module
 */
import type { AnalysisDescriptor } from "./analysis_descriptor.ts";
import type { QuantityReader } from "./quantity_reading.ts";
import { spectrumDescriptor } from "./dsp/spectrum_descriptor.ts";
import { frfDescriptor } from "./frf/frf_descriptor.ts";
import { hammerDescriptor } from "./frf/hammer_descriptor.ts";
import { dampingDescriptor } from "./modal/damping_descriptor.ts";
import { bandsDescriptor } from "./acoustics/bands_descriptor.ts";
import { levelDescriptor } from "./acoustics/level_descriptor.ts";
import { ordersDescriptor } from "./orders/orders_descriptor.ts";
import { spectrogramDescriptor } from "./dsp/spectrogram_descriptor.ts";
import { modalDescriptor } from "./modal/modal_descriptor.ts";
import { macDescriptor } from "./modal/mac_descriptor.ts";
import { pathsDescriptor } from "./paths/paths_descriptor.ts";
import { compareDescriptor } from "./compare/compare_descriptor.ts";
import { comfortDescriptor } from "./comfort/comfort_descriptor.ts";
import { handArmDescriptor } from "./comfort/hand_arm_descriptor.ts";
import { speechDescriptor } from "./quality/speech_descriptor.ts";
import { loudnessDescriptor } from "./quality/loudness_descriptor.ts";
import { tonesDescriptor } from "./quality/tones_descriptor.ts";

/** A table of analyses with what the command table, plans and targets ask of it. */
export interface AnalysisTable {
  /** The descriptors, in the table's order. */
  readonly descriptors: readonly AnalysisDescriptor[];
  /** The descriptor of the analysis `name`, if there is one. */
  get(name: string): AnalysisDescriptor | undefined;
  /** The analyses a plan's `analyses` can run, in order. */
  readonly planCommands: readonly string[];
  /** The command a plan's `comparisons` run with, if any. */
  readonly comparison: string | undefined;
  /** The plan keys of files steps read (`{ "file": … }`), in order. */
  readonly planFiles: readonly string[];
  /** Every target quantity, in order. */
  readonly quantities: readonly string[];
  /** The reader of quantity `name`, if there is one. */
  quantity(name: string): QuantityReader | undefined;
}

/**
 * A table of the given analyses; names and quantities must differ.
 *
 * @throws {Error} for a name or quantity given twice, or two comparison commands.
 *
 * @example
 * ```ts
 * import { analysisTable } from "./analyses.ts";
 * import { spectrumDescriptor } from "./dsp/spectrum_descriptor.ts";
 * const table = analysisTable([spectrumDescriptor]);
 * if (table.planCommands.join() !== "spectrum" || table.get("frf") !== undefined) throw new Error();
 * ```
 */
export function analysisTable(descriptors: readonly AnalysisDescriptor[]): AnalysisTable {
  const byName = new Map<string, AnalysisDescriptor>();
  const readers = new Map<string, QuantityReader>();
  const planFiles: string[] = [];
  for (const d of descriptors) {
    if (byName.has(d.name)) throw new Error(`analysis "${d.name}" is in the table twice`);
    byName.set(d.name, d);
    for (const [name, reader] of Object.entries(d.quantities ?? {})) {
      if (readers.has(name)) throw new Error(`quantity "${name}" is given by two analyses`);
      readers.set(name, reader);
    }
    if (d.plan?.step === "analysis") {
      for (const file of d.plan.reads.files ?? []) {
        if (!planFiles.includes(file.key)) planFiles.push(file.key);
      }
    }
  }
  const comparisons = descriptors.filter((d) => d.plan?.step === "comparison");
  if (comparisons.length > 1) throw new Error("the table has two comparison commands");
  return {
    descriptors,
    get: (name) => byName.get(name),
    planCommands: descriptors.filter((d) => d.plan?.step === "analysis").map((d) => d.name),
    comparison: comparisons[0]?.name,
    planFiles,
    quantities: [...readers.keys()],
    quantity: (name) => readers.get(name),
  };
}

/** quiver's analyses. */
export const ANALYSES: AnalysisTable = analysisTable([
  spectrumDescriptor,
  frfDescriptor,
  hammerDescriptor,
  dampingDescriptor,
  bandsDescriptor,
  levelDescriptor,
  ordersDescriptor,
  spectrogramDescriptor,
  modalDescriptor,
  macDescriptor,
  pathsDescriptor,
  compareDescriptor,
  comfortDescriptor,
  handArmDescriptor,
  speechDescriptor,
  loudnessDescriptor,
  tonesDescriptor,
]);
