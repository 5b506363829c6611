/**
 * What quiver knows about one analysis, in one place: its command, the
 * schema of its result's metadata, what a plan step of it reads, the side
 * outputs it writes and the target quantities read from its result. Each
 * analysis keeps its descriptor beside its code (`lib/<folder>/<name>_descriptor.ts`);
 * lib/analyses.ts lists them, and the command table, the plan schema, the
 * plan runner and the targets loop over that list.
 *
 * @module
 */
// Types only: the table of analyses loads at every start-up (quiver --version too), so
// nothing here or in a descriptor loads zod, a schema or an analysis before it is used.
import type { z } from "npm:zod@4.6.7";
import type { ParseArgsOptionsConfig } from "node:util";
// Types only: lib/ loads cli/ modules only through a descriptor's `load`.
import type { OptionEntry } from "../cli/option_table.ts";
import type { QuantityReader } from "./quantity_reading.ts";
import type { SectionModule } from "./report/section.ts";
import type { DiffModule } from "./history/run_diff_view.ts";

/** What every command module exports. */
export interface CommandModule {
  /** One-line summary for the command list. */
  readonly summary: string;
  /** The command's help text. */
  readonly help: string;
  /** parseArgs spec of the options. */
  readonly options: ParseArgsOptionsConfig;
  /** zod schema of the options. */
  readonly schema: z.ZodType;
  /** Runs the command. */
  run(argv: readonly string[]): Promise<void>;
}

/** A plan step's options, as the plan gives them (names without dashes). */
export type StepOptions = Readonly<Record<string, unknown>>;

/**
 * A side output: an `*-out` option of the command's option table, with the
 * kind of file the plan runner names for it (`<id>_<part>.json` or `.csv`).
 * It carries no schema, so that a descriptor loads no zod: the option
 * table gives a side output the schema of a FILE option (cli/option_table.ts,
 * `shapeOf`).
 */
export interface SideOutput extends Omit<OptionEntry, "schema" | "feeds"> {
  /** The file the option writes, as the runner names it. */
  readonly writes: "json" | "csv";
  /** The output is written only when this holds of the step's options. Default: always. */
  readonly onlyWith?: (options: StepOptions) => boolean;
  /** A FILE option. */
  readonly value: "FILE";
  /** Never required. */
  readonly required: false;
}

/**
 * Declares a side output: a `FILE` option of the command (the command's
 * option table spreads it in) that the plan runner gives a file name.
 *
 * @example
 * ```ts
 * import { sideOutput } from "./analysis_descriptor.ts";
 * const hits = sideOutput("csv", { help: "hit log" });
 * if (hits.writes !== "csv" || hits.value !== "FILE" || hits.required) throw new Error();
 * ```
 */
export function sideOutput(
  writes: "json" | "csv",
  entry: { help: string; onlyWith?: (options: StepOptions) => boolean },
): SideOutput {
  return { value: "FILE", required: false, ...entry, writes };
}

/** Earlier plan steps' results that a step reads. */
export interface ResultsRead {
  /**
   * The plan key naming them: `input` (one id) or `inputs` (a list of ids;
   * with `inputOrInputs`, one id under `input` is taken as a list of one).
   */
  readonly key: "input" | "inputs";
  /** `inputs` may also be given as one `input`. Default false. */
  readonly inputOrInputs?: boolean;
  /** The commands whose results it reads. */
  readonly from: readonly string[];
  /** Which output of theirs: `out` or a side output key. */
  readonly output: string;
  /** The command's option that takes them, as a comma-separated list; absent: positional arguments. */
  readonly option?: string;
  /** The problem named when the plan gives none. */
  readonly missing: string;
}

/** A plan file a step reads besides recordings and results: `{ "file": … }` under `key`. */
export interface FileRead {
  /** The plan key (`geometry`, `simulation`, `map`). */
  readonly key: string;
  /** The command's option taking it; absent: a positional argument. */
  readonly option?: string;
  /** The problem named when the plan leaves it out; absent: the file is optional. */
  readonly missing?: string;
}

/**
 * What a plan step of the analysis reads, given to its command in this
 * order: earlier results, plan files, then the recording (with its set-up,
 * rate and slice).
 */
export interface StepReads {
  readonly results?: ResultsRead;
  readonly files?: readonly FileRead[];
  /** The step names a recording of the plan. */
  readonly recording: boolean;
}

/** One analysis. */
export interface AnalysisDescriptor {
  /** The command's name (`quiver <name>`, a plan step's `command`). */
  readonly name: string;
  /** Loads the command's module, only when it is asked for (start-up loads no other command). */
  readonly load: () => Promise<CommandModule>;
  /**
   * The zod schema of its result's metadata, or (as quiver's own descriptors
   * give it) a loader of it, so that start-up builds no schema.
   */
  readonly metadata: z.ZodType | (() => Promise<z.ZodType>);
  /**
   * How a plan runs it: as an analysis (reading `reads`), as a comparison
   * (the plan's `comparisons` section), or not at all.
   */
  readonly plan?:
    | { readonly step: "analysis"; readonly reads: StepReads }
    | { readonly step: "comparison" };
  /** Its side outputs, by option name (every `*-out` option but `out`). Default: none. */
  readonly outputs?: Readonly<Record<string, SideOutput>>;
  /** The target quantities read from its result, by name. Default: none. */
  readonly quantities?: Readonly<Record<string, QuantityReader>>;
  /** Loads the module that builds its steps' report sections. Default: none (no section). */
  readonly report?: () => Promise<SectionModule>;
  /**
   * Loads what `quiver diff` reads of its result: its lines with the kind of
   * quantity and the degrees of freedom of each column, its single values
   * (lib/history/run_diff_view.ts). Default: none (its steps are listed as
   * not compared).
   */
  readonly diff?: () => Promise<DiffModule>;
}
