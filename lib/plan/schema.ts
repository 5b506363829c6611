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
import { isReportFileName } from "./campaign_paths.ts";

/** The analysis commands a plan can run. */
export const PLAN_COMMANDS = [
  "spectrum",
  "frf",
  "hammer",
  "damping",
  "bands",
  "level",
  "orders",
  "spectrogram",
  "modal",
  "mac",
  "paths",
] as const;

const id = z.string().regex(/^[A-Za-z0-9_-]+$/, "ids use letters, digits, _ and - only");
const optionValue = z.union([
  z.string(),
  z.number(),
  z.boolean(),
  z.array(z.union([z.string(), z.number()])),
]);

const recording = z.strictObject({
  file: z.string().min(1),
  setup: z.string().min(1).optional(),
  rate: z.number().positive().optional(),
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

const analysis = z.strictObject({
  id,
  command: z.enum(PLAN_COMMANDS),
  recording: z.string().optional(),
  input: z.string().optional(),
  /**
   * `modal`: the ids of the frf or hammer analyses whose FRFs it fits together;
   * `paths`: those holding each path's transfer, in the order of its references.
   */
  inputs: z.array(z.string()).min(1).optional(),
  /** `modal`: the test geometry (point, x, y, z, line_to) for the report's shape drawings. */
  geometry: z.strictObject({ file: z.string().min(1) }).optional(),
  /** `mac`: the simulation's mode shapes. */
  simulation: z.strictObject({ file: z.string().min(1) }).optional(),
  /** `mac`: which simulation point is which test point (simulation_point, …, test_direction). */
  map: z.strictObject({ file: z.string().min(1) }).optional(),
  title: z.string().optional(),
  options: z.record(optionName, optionValue).default({}),
});

const comparison = z.strictObject({
  id,
  test: z.string(),
  test_column: z.string().optional(),
  simulation: z.strictObject({ file: z.string().min(1), column: z.string().optional() }),
  title: z.string().optional(),
  options: z.record(optionName, optionValue).default({}),
});

const valueTarget = z.strictObject({
  id,
  type: z.enum(["min", "max"]),
  value: z.number(),
  unit: z.string().default(""),
  description: z.string().optional(),
  of: z.strictObject({
    analysis: z.string(),
    quantity: z.enum([
      "first_mode_hz",
      "mode_hz",
      "overall_db",
      "leq_db",
      "lmax_db",
      "pair_mac",
      "pair_shift_percent",
    ]),
    channel: z.string().optional(),
    mode: z.number().int().positive().optional(),
  }),
});

const curveTarget = z.strictObject({
  id,
  type: z.literal("limit_curve"),
  limit: z.enum(["min", "max"]),
  unit: z.string().default(""),
  description: z.string().optional(),
  of: z.strictObject({ analysis: z.string(), channel: z.string() }),
  points: z.array(z.tuple([z.number().positive(), z.number()])).min(2),
});

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
export const planSchema = z.strictObject({
  quiver_plan: z.literal(1),
  title: z.string().min(1),
  description: z.string().optional(),
  recordings: z.record(z.string(), recording),
  analyses: z.array(analysis).min(1),
  comparisons: z.array(comparison).default([]),
  targets: z.array(z.union([valueTarget, curveTarget])).default([]),
  /** When true, a failed or unchecked target makes `run` exit with TARGETS_NOT_MET_EXIT. */
  require_targets: z.boolean().default(false),
  report: z.strictObject({
    title: z.string().optional(),
    /** One plain file name ending .html, written in the output folder itself. */
    file: z.string().refine(
      isReportFileName,
      'the report is one file name ending .html, in the output folder itself (no folder, no "." or "..")',
    ).default("report.html"),
  }).optional(),
});

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
  options: Readonly<Record<string, z.infer<typeof optionValue>>>,
): string[] {
  return Object.entries(options).flatMap(([key, value]) => {
    if (value === true) return [`--${key}`];
    if (value === false) return [];
    return [`--${key}`, Array.isArray(value) ? value.join(",") : String(value)];
  });
}
