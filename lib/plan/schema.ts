/**
 * The plan file: one JSON document describing a test campaign.
 *
 * ```json
 * {
 *   "quiver_plan": 1,
 *   "title": "Tamarack E5 — body and cabin NVH, build B2",
 *   "recordings": { "road": { "file": "road_80kph.wav", "setup": "road_setup.json" } },
 *   "analyses": [
 *     { "id": "road_psd", "command": "spectrum", "recording": "road", "options": { "resolution": 1 } },
 *     { "id": "bracket_modes", "command": "damping", "input": "bracket_frf", "options": { "max-hz": 400 } }
 *   ],
 *   "comparisons": [
 *     { "id": "bracket_vs_sim", "test": "bracket_frf", "test_column": "bracket_a",
 *       "simulation": { "file": "bracket_sim.csv" }, "options": { "bands": 3 } }
 *   ],
 *   "targets": [
 *     { "id": "bracket_first_mode", "type": "min", "value": 38, "unit": "Hz",
 *       "of": { "analysis": "bracket_modes", "quantity": "first_mode_hz" } },
 *     { "id": "cabin_thirds", "type": "limit_curve", "limit": "max", "unit": "dB(A)",
 *       "of": { "analysis": "cabin_bands", "channel": "driver_ear" }, "points": [[25, 70], [4000, 55]] }
 *   ],
 *   "report": { "title": "B2 body NVH", "file": "report.html" }
 * }
 * ```
 *
 * Paths are relative to the plan file's folder. `options` use the command
 * line's option names without the dashes (`"rpm-step": 50`, `"orders": [2, 6.5]`,
 * `"power": true`) and are checked by the command's own schema before any
 * work starts. A recording's `setup` and `rate` are passed to every analysis
 * of it. `damping` takes `input` (an `frf` or `hammer` analysis) instead of
 * a recording. `"require_targets": true` makes a run whose targets are not all
 * met (failed or not checked) exit with code 4, for scripts and CI; the
 * default reports them and exits 0.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { isShowable } from "../io/names.ts";
import { isReportFileName } from "./campaign_paths.ts";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import { didYouMeanClause } from "../nearest_name.ts";

/** The analysis commands a plan can run (lib/analyses.ts). */
export const PLAN_COMMANDS: readonly string[] = ANALYSES.planCommands;

/** A list of names as zod's enum takes it (the table never leaves one empty). */
function names(list: readonly string[]): [string, ...string[]] {
  return (list.length > 0 ? [...list] : [""]) as [string, ...string[]];
}

// Ids name files (<id>.json, <id>_<part>.json): a portable set, and short enough for any file system.
const id = z.string().regex(/^[A-Za-z0-9_-]+$/, "ids use letters, digits, _ and - only")
  .max(100, "ids are at most 100 characters (they name the step's files)");

/**
 * Text a plan shows (titles, descriptions) in the report and on the terminal:
 * no control, bidirectional or zero-width character (lib/io/names.ts), which
 * would reorder or hide what is shown around it; a description may hold line feeds.
 */
const shown = (allowNewlines = false) =>
  z.string().refine(
    (text) => isShowable(text, allowNewlines),
    "holds a control, bidirectional or zero-width character, which would change how the report and the terminal show it",
  );
const optionValue = z.union([
  z.string(),
  z.number(),
  z.boolean(),
  z.array(z.union([z.string(), z.number()])),
]);

const recordingSchema = z.strictObject({
  file: z.string().min(1),
  setup: z.string().min(1).optional(),
  rate: z.number().positive().optional(),
  /** The group to read in a file that holds several (HDF5, MDF 4): a path, name or index. */
  group: z.string().min(1).optional(),
  /** A time slice of the recording, s on its own time axis, for every analysis of it. */
  start: z.number().optional(),
  end: z.number().optional(),
  description: z.string().optional(),
});

/**
 * Option names as the command line spells them without dashes: lower case,
 * digits and inner dashes only. Anything else (`"format=csv"`, `"--out"`,
 * `"help"`) could smuggle a second option past the runner's checks.
 */
const optionName = z.string().regex(
  /^[a-z][a-z0-9]*(-[a-z0-9]+)*$/,
  "an option name is the command's option without dashes, e.g. rpm-step",
).refine((name) => name !== "help" && name !== "debug", "help and debug are not plan options");

/** The schema of one analysis step, for the analyses of `table`. */
function analysisSchemaOf(table: AnalysisTable) {
  const files = Object.fromEntries(
    table.planFiles.map((key) => [key, z.strictObject({ file: z.string().min(1) }).optional()]),
  );
  return z.strictObject({
    id,
    command: z.enum(names(table.planCommands)),
    recording: z.string().optional(),
    input: z.string().optional(),
    /**
     * The ids of the earlier steps whose results it reads (lib/analysis_descriptor.ts
     * `ResultsRead`), e.g. `modal`'s frf or hammer analyses, `paths`' transfers.
     */
    inputs: z.array(z.string()).min(1).optional(),
    // The plan files steps read, `{ "file": … }` under a key each (modal's geometry, mac's
    // simulation and map): typed as the files of any analysis.
    // (Typed as no key: read them with stepFile.)
    ...(files as Record<never, never>),
    title: shown().optional(),
    options: z.record(optionName, optionValue).default({}),
  });
}

const comparisonSchema = z.strictObject({
  id,
  test: z.string(),
  test_column: z.string().optional(),
  simulation: z.strictObject({ file: z.string().min(1), column: z.string().optional() }),
  title: shown().optional(),
  options: z.record(optionName, optionValue).default({}),
});

/** The schema of a single-value target, for the quantities of `table`. */
function valueTargetOf(table: AnalysisTable) {
  return z.strictObject({
    id,
    type: z.enum(["min", "max"]),
    value: z.number(),
    unit: z.string().default(""),
    description: z.string().optional(),
    of: z.strictObject({
      analysis: z.string(),
      quantity: z.enum(names(table.quantities)),
      channel: z.string().optional(),
      mode: z.number().int().positive().optional(),
      order: z.number().positive().optional(),
      frequency_hz: z.number().positive().optional(),
    }),
  });
}

const curveTarget = z.strictObject({
  id,
  type: z.literal("limit_curve"),
  limit: z.enum(["min", "max"]),
  unit: z.string().default(""),
  description: z.string().optional(),
  of: z.strictObject({ analysis: z.string(), channel: z.string() }),
  points: z.array(z.tuple([z.number().positive(), z.number()])).min(
    2,
    "a limit curve needs at least two points [Hz, value]",
  ),
});

/** The plan schema of the analyses of `table`. */
function buildPlanSchema(table: AnalysisTable) {
  return z.strictObject({
    quiver_plan: z.literal(1),
    title: shown().pipe(z.string().min(1)),
    description: shown(true).optional(),
    recordings: z.record(z.string(), recordingSchema),
    analyses: z.array(analysisSchemaOf(table)).min(1, "a plan needs at least one analysis"),
    comparisons: z.array(comparisonSchema).default([]),
    // Discriminated by `type`, so that a mistake inside a target is named, not a bare "Invalid input".
    targets: z.array(z.discriminatedUnion("type", [valueTargetOf(table), curveTarget])).default([]),
    /** When true, a failed or unchecked target makes `run` exit with TARGETS_NOT_MET_EXIT. */
    require_targets: z.boolean().default(false),
    report: z.strictObject({
      title: shown().optional(),
      /** One plain file name ending .html, written in the output folder itself. */
      file: z.string().refine(
        isReportFileName,
        'the report is one file name ending .html, in the output folder itself (no folder, no "." or "..")',
      ).default("report.html"),
    }).optional(),
  });
}

const schemas = new WeakMap<AnalysisTable, ReturnType<typeof buildPlanSchema>>();

/**
 * The zod schema of a plan file whose steps and targets are those of the
 * analyses of `table` (quiver's own by default).
 *
 * @example
 * ```ts
 * import { planSchemaOf } from "./schema.ts";
 * import { analysisTable } from "../analyses.ts";
 * import { spectrumDescriptor } from "../dsp/spectrum_descriptor.ts";
 * const only = planSchemaOf(analysisTable([spectrumDescriptor]));
 * const plan = { quiver_plan: 1, title: "t", recordings: {}, analyses: [{ id: "f", command: "frf", recording: "r" }] };
 * if (only.safeParse(plan).success || !planSchemaOf().safeParse(plan).success) throw new Error();
 * ```
 */
export function planSchemaOf(table: AnalysisTable = ANALYSES): ReturnType<typeof buildPlanSchema> {
  let schema = schemas.get(table);
  if (schema === undefined) {
    schema = buildPlanSchema(table);
    schemas.set(table, schema);
  }
  return schema;
}

/**
 * The zod schema of a plan file.
 *
 * @example
 * ```ts
 * import { planSchema } from "./schema.ts";
 * const plan = planSchema.parse({ quiver_plan: 1, title: "t", recordings: { r: { file: "r.csv" } },
 *   analyses: [{ id: "s", command: "spectrum", recording: "r", options: { kind: "rms" } }] });
 * if (plan.analyses[0].command !== "spectrum") throw new Error();
 * ```
 */
export const planSchema = planSchemaOf(ANALYSES);

/** The value of an option in a plan: text, a number, a flag or a list. */
export type OptionValue = z.infer<typeof optionValue>;

/** A validated plan. */
export type Plan = z.infer<typeof planSchema>;
/** One analysis step of a plan. */
export type PlanAnalysis = Plan["analyses"][number];
/** One comparison of a plan. */
export type PlanComparison = Plan["comparisons"][number];
/** One target of a plan. */
export type PlanTarget = Plan["targets"][number];

/**
 * Formats a zod issue path as a key path: `analyses[2].options.rpm-step`.
 *
 * @example
 * ```ts
 * import { keyPath } from "./schema.ts";
 * if (keyPath(["analyses", 2, "command"]) !== "analyses[2].command") throw new Error();
 * ```
 */
export function keyPath(path: readonly PropertyKey[]): string {
  return path.map((
    p,
    i,
  ) => (typeof p === "number" ? `[${p}]` : `${i === 0 ? "" : "."}${String(p)}`)).join("");
}

/**
 * Turns plan options into command-line arguments: `{ "rpm-step": 50, "orders": [2, 6.5], "power": true }`
 * → `--rpm-step 50 --orders 2,6.5 --power`.
 *
 * @example
 * ```ts
 * import { optionsToArgv } from "./schema.ts";
 * if (optionsToArgv({ orders: [2, 6.5], power: true }).join(" ") !== "--orders 2,6.5 --power") throw new Error();
 * ```
 */
export function optionsToArgv(
  options: Readonly<Record<string, OptionValue>>,
): string[] {
  return Object.entries(options).flatMap(([key, value]) => {
    if (value === true) return [`--${key}`];
    if (value === false) return [];
    return [`--${key}`, Array.isArray(value) ? value.join(",") : String(value)];
  });
}

/** One recording of a plan. */
export type PlanRecording = Plan["recordings"][string];

/**
 * The file a step names under the plan key `key` (`geometry`, `simulation`,
 * `map`: see its analysis's `FileRead`), if it names one.
 *
 * @example
 * ```ts
 * import { planSchema, stepFile } from "./schema.ts";
 * const plan = planSchema.parse({ quiver_plan: 1, title: "t", recordings: {},
 *   analyses: [{ id: "m", command: "modal", inputs: ["f"], geometry: { file: "g.csv" } }] });
 * if (stepFile(plan.analyses[0], "geometry") !== "g.csv" || stepFile(plan.analyses[0], "map") !== undefined) throw new Error();
 * ```
 */
export function stepFile(step: PlanAnalysis, key: string): string | undefined {
  const entry = (step as Readonly<Record<string, unknown>>)[key];
  return isObject(entry) && typeof entry.file === "string" ? entry.file : undefined;
}

/** What each target type needs, for messages. */
const TARGET_TYPES =
  'type "min" or "max" checks one value (keys id, value, of: {analysis, quantity}; optional unit, description, of.channel, of.mode, of.order, of.frequency_hz); ' +
  'type "limit_curve" checks a spectrum against a curve (keys id, limit: "min" or "max", of: {analysis, channel}, points: [[Hz, value], …]; optional unit, description)';

/** An item of a plan list that passed its schema, or what could be read of one that did not. */
export type Drafted<T> =
  | { readonly ok: true; readonly value: T }
  | { readonly ok: false; readonly id?: string; readonly command?: string };

/**
 * A plan read as far as it goes: each recording, analysis, comparison and
 * target that passes its own schema, and the id (and command) of each that
 * does not, so that the checks after the schema still run on the rest and a
 * reference to a broken item is no second problem.
 */
export interface PlanDraft {
  readonly recordings: ReadonlyMap<string, PlanRecording>;
  /** Recordings named in the plan whose entry is broken: references to them are not problems. */
  readonly brokenRecordings: ReadonlySet<string>;
  readonly analyses: readonly Drafted<PlanAnalysis>[];
  readonly comparisons: readonly Drafted<PlanComparison>[];
  readonly targets: readonly Drafted<PlanTarget>[];
  /** The report section, when present and valid. */
  readonly report: Plan["report"];
}

/**
 * The draft of a plan that passed the schema (nothing broken).
 *
 * @example
 * ```ts
 * import { draftOfPlan, planSchema } from "./schema.ts";
 * const plan = planSchema.parse({ quiver_plan: 1, title: "t", recordings: { r: { file: "r.csv" } },
 *   analyses: [{ id: "s", command: "spectrum", recording: "r" }] });
 * if (!draftOfPlan(plan).analyses[0].ok) throw new Error();
 * ```
 */
export function draftOfPlan(plan: Plan): PlanDraft {
  const ok = <T>(value: T): Drafted<T> => ({ ok: true, value });
  return {
    recordings: new Map(Object.entries(plan.recordings)),
    brokenRecordings: new Set(),
    analyses: plan.analyses.map(ok),
    comparisons: plan.comparisons.map(ok),
    targets: plan.targets.map(ok),
    report: plan.report,
  };
}

/** A plain JSON object (not an array, not null). */
function isObject(value: unknown): value is Record<string, unknown> {
  return typeof value === "object" && value !== null && !Array.isArray(value);
}

/**
 * Reads a plan's JSON item by item: the whole plan when it passes the schema,
 * else a draft of what passes and every schema problem as `[key path, detail]`,
 * each naming what was expected (allowed values, keys, the nearest name).
 *
 * @example
 * ```ts
 * import { readPlanJson } from "./schema.ts";
 * const { draft, problems } = readPlanJson({ quiver_plan: 1, title: "t", recordings: {},
 *   analyses: [{ id: "a", command: "spectrun" }, { id: "b", command: "spectrum", recording: "r" }] });
 * if (problems.length !== 1 || problems[0][0] !== "analyses[0].command") throw new Error();
 * if (draft.analyses[0].ok || draft.analyses[0].id !== "a" || !draft.analyses[1].ok) throw new Error();
 * ```
 */
export function readPlanJson(
  json: unknown,
  table: AnalysisTable = ANALYSES,
): { plan?: Plan; draft: PlanDraft; problems: [string, string][] } {
  const schema = planSchemaOf(table);
  const parsed = schema.safeParse(json);
  if (parsed.success) return { plan: parsed.data, draft: draftOfPlan(parsed.data), problems: [] };
  const problems = parsed.error.issues.flatMap((issue) => issueProblems(issue, json, schema));
  const top = isObject(json) ? json : {};
  const recordings = new Map<string, PlanRecording>();
  const brokenRecordings = new Set<string>();
  if (isObject(top.recordings)) {
    for (const [name, entry] of Object.entries(top.recordings)) {
      const r = recordingSchema.safeParse(entry);
      if (r.success) recordings.set(name, r.data);
      else brokenRecordings.add(name);
    }
  }
  const items = <T>(list: unknown, schema: z.ZodType<T>): Drafted<T>[] =>
    (Array.isArray(list) ? list : []).map((item): Drafted<T> => {
      const r = schema.safeParse(item);
      if (r.success) return { ok: true, value: r.data };
      const raw = isObject(item) ? item : {};
      return {
        ok: false,
        ...(typeof raw.id === "string" ? { id: raw.id } : {}),
        ...(typeof raw.command === "string" ? { command: raw.command } : {}),
      };
    });
  const report = schema.shape.report.safeParse(top.report);
  return {
    draft: {
      recordings,
      brokenRecordings,
      analyses: items(top.analyses, schema.shape.analyses.element),
      comparisons: items(top.comparisons, comparisonSchema),
      targets: items(top.targets, schema.shape.targets.unwrap().element),
      report: report.success ? report.data : undefined,
    },
    problems,
  };
}

/** The value at `path` in `json`, or undefined. */
function valueAt(json: unknown, path: readonly PropertyKey[]): unknown {
  let value = json;
  for (const key of path) {
    if (Array.isArray(value) && typeof key === "number") value = value[key];
    else if (isObject(value) && typeof key === "string" && Object.hasOwn(value, key)) {
      value = value[key];
    } else return undefined;
  }
  return value;
}

/** The schema that applies at `path`, following the data through unions; undefined when none. */
function schemaAt(
  path: readonly PropertyKey[],
  json: unknown,
  plan: z.ZodType,
): z.ZodType | undefined {
  let schema: z.ZodType | undefined = plan;
  let value = json;
  const unwrap = (s: z.ZodType | undefined, v: unknown): z.ZodType | undefined => {
    for (;;) {
      if (s instanceof z.ZodOptional || s instanceof z.ZodDefault) s = s.unwrap() as z.ZodType;
      else if (s instanceof z.ZodDiscriminatedUnion) {
        const options = s.options as readonly z.ZodType[];
        s = options.find((o) =>
          o instanceof z.ZodObject && isObject(v) && o.shape.type.safeParse(v.type).success
        );
      } else return s;
    }
  };
  for (const key of path) {
    schema = unwrap(schema, value);
    if (schema instanceof z.ZodObject && typeof key === "string") {
      schema = Object.hasOwn(schema.shape, key) ? schema.shape[key] as z.ZodType : undefined;
    } else if (schema instanceof z.ZodArray) schema = schema.element as z.ZodType;
    else if (schema instanceof z.ZodRecord) schema = schema.valueType as z.ZodType;
    else return undefined;
    value = valueAt(value, [key]);
  }
  return unwrap(schema, value);
}

/** "a string", "a number", … for a JSON value. */
function jsonKind(value: unknown): string {
  if (value === null) return "null";
  if (Array.isArray(value)) return "a list";
  if (typeof value === "object") return "an object";
  if (typeof value === "boolean") return `${value}`;
  return `${typeof value === "number" ? "a number" : "a string"} (${JSON.stringify(value)})`;
}

/** One zod issue of a plan as `[key path, detail]` problems, each saying what was expected. */
function issueProblems(
  issue: z.core.$ZodIssue,
  json: unknown,
  plan: z.ZodType,
): [string, string][] {
  const where = (path: readonly PropertyKey[]) => keyPath(path) || "(top level)";
  const got = valueAt(json, issue.path);
  const last = issue.path.at(-1);
  switch (issue.code) {
    case "unrecognized_keys": {
      const schema = schemaAt(issue.path, json, plan);
      const allowed = schema instanceof z.ZodObject ? Object.keys(schema.shape) : [];
      return issue.keys.map((key) => [
        where([...issue.path, key]),
        `unknown key "${key}"${didYouMeanClause(key, allowed)}${
          allowed.length > 0 ? ` (keys here: ${allowed.join(", ")})` : ""
        }`,
      ]);
    }
    case "invalid_union": {
      if (issue.discriminator === "type") {
        const head = typeof got === "string"
          ? `"${got}" is not a target type${didYouMeanClause(got, ["min", "max", "limit_curve"])}`
          : got === undefined
          ? "a target needs a type"
          : `a target's type is a string, not ${jsonKind(got)}`;
        return [[where(issue.path), `${head} (${TARGET_TYPES})`]];
      }
      if (issue.path.includes("options")) {
        return [[
          where(issue.path),
          `an option's value is a string, a number, true/false or a list of strings and numbers, not ${
            jsonKind(got)
          }`,
        ]];
      }
      const forms = issue.errors.map((e) => e[0]?.message ?? "").filter((m) => m !== "");
      return [[where(issue.path), `matches none of its forms: ${forms.join("; or ")}`]];
    }
    case "invalid_value": {
      const values = issue.values.map((v) => String(v));
      if (values.length === 1) {
        return [[
          where(issue.path),
          `must be ${JSON.stringify(issue.values[0])}, not ${
            got === undefined ? "missing" : jsonKind(got)
          }`,
        ]];
      }
      const name = typeof last === "string" ? last : "value";
      const head = typeof got === "string"
        ? `unknown ${name} "${got}"${didYouMeanClause(got, values)}`
        : got === undefined
        ? `${name} is missing`
        : `${name} must be one of the names below, not ${jsonKind(got)}`;
      return [[where(issue.path), `${head} (allowed: ${values.join(", ")})`]];
    }
    case "invalid_type": {
      const expected = issue.expected === "array"
        ? "a list"
        : issue.expected === "object"
        ? "an object"
        : `a ${issue.expected}`;
      return [[
        where(issue.path),
        got === undefined
          ? `missing: ${expected} is needed`
          : `${expected} is needed, not ${jsonKind(got)}`,
      ]];
    }
    default:
      return [[where(issue.path), issue.message]];
  }
}
