/**
 * The shape of a report section and of the module that builds one for an
 * analysis: every module under `sections/` exports `section`, a
 * {@linkcode SectionBuilder}, and is loaded by the step's command name
 * through section_loaders.ts.
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";
import type { Manifest } from "../plan/runner.ts";
import type { TargetOutcome } from "../plan/target_eval.ts";
import type { Figure } from "./figure.ts";

/** One step of a run, as its manifest records it. */
export type ManifestStep = Manifest["steps"][number];

/** A section of the report: a heading, a note, figures and markup. */
export interface ReportSection {
  readonly heading: string;
  readonly note?: string;
  readonly figures: Figure[];
  readonly html?: string;
  /** The step's result could not be shown (the step failed or its result is unreadable). */
  readonly failed?: boolean;
}

/** A limit-curve target of the plan with its outcome, for drawing on its analysis's chart. */
export interface CurveLimit {
  readonly id: string;
  readonly channel: string;
  readonly points: readonly (readonly [number, number])[];
  readonly outcome?: TargetOutcome;
}

/** What a section module is given to build the section of one finished step. */
export interface SectionInput {
  /** The step, as the manifest records it (its id names the result and side results). */
  readonly step: ManifestStep;
  /** The section's heading: the plan's title of the step, else its id. */
  readonly title: string;
  /** The step's result (`<outDir>/<step id>.json`), read. */
  readonly result: ResultTable;
  /** The run's output folder, where side results (`<step id>_<suffix>.json`) are. */
  readonly outDir: string;
  /** The common note: the command, what it read, and the result's warnings. */
  readonly note: string;
  /** The plan's limit-curve targets on this step. */
  readonly limits: readonly CurveLimit[];
}

/**
 * Builds a step's section. A result whose metadata or columns are not what
 * its command writes is refused with a QuiverError (the report names it in
 * place of the section), never drawn from guesses.
 */
export type SectionBuilder = (input: SectionInput) => Promise<ReportSection>;

/** A section module, as `import()` gives it. */
export interface SectionModule {
  readonly section: SectionBuilder;
}

/** Loads a section module when a step of its command is shown. */
export type SectionLoader = () => Promise<SectionModule>;
