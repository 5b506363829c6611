/**
 * The commands a plan can run, as the plan runner sees them: a dry check of
 * the arguments (each command's own option schema) and the run itself. The
 * names are those of the analyses a plan can run as steps or comparisons
 * (lib/analyses.ts); each module is loaded through its descriptor.
 *
 * @module
 */
import { parseArgs } from "node:util";
import type { z } from "npm:zod@4.6.7";
import type { PlanCommand, PlanOptionProblem } from "../lib/plan/step_options.ts";
import { ANALYSES, type AnalysisTable } from "../lib/analyses.ts";
import { COMMON_OPTIONS, type OptionSpec, parseCommandArgs } from "./args.ts";
import { nearestName } from "../lib/nearest_name.ts";

/**
 * The plan runner's command table, with the modules of the commands of the
 * analyses of `table` (quiver's by default) that a plan can run loaded.
 */
export async function planCommandTable(
  table: AnalysisTable = ANALYSES,
): Promise<Readonly<Record<string, PlanCommand>>> {
  const runnable = table.descriptors.filter((d) => d.plan !== undefined);
  const modules = await Promise.all(runnable.map((d) => d.load()));
  return Object.fromEntries(runnable.map(({ name }, i) => {
    const command = modules[i];
    return [name, {
      validate: (argv: readonly string[]) =>
        void parseCommandArgs(argv, command.options, command.schema),
      problems: (argv: readonly string[]) => optionProblems(argv, command.options, command.schema),
      optionNames: Object.keys(command.options),
      run: command.run,
    }];
  }));
}

/**
 * Every problem the command's own schema finds in `argv`, one per option, so
 * that a plan step with two bad options gets both named at their key paths;
 * a value outside a list of names gets the allowed names and the nearest.
 * When the values pass, the command's full check (outputs, inputs) runs.
 *
 * @example
 * ```ts
 * import { optionProblems } from "./plan_commands.ts";
 * import { z } from "npm:zod@4.6.7";
 * const spec = { kind: { type: "string" as const }, block: { type: "string" as const } };
 * const schema = z.strictObject({ kind: z.enum(["psd", "rms"]).optional(), block: z.string().optional() });
 * const [p] = optionProblems(["--kind", "rm"], spec, schema);
 * if (p.option !== "kind" || p.message !== 'unknown value "rm"; did you mean "rms"? (allowed: psd, rms)') throw new Error();
 * ```
 */
export function optionProblems(
  argv: readonly string[],
  spec: OptionSpec,
  schema: z.ZodType,
): PlanOptionProblem[] {
  const whole = (): PlanOptionProblem[] => {
    try {
      parseCommandArgs(argv, spec, schema);
      return [];
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      return [{ option: /--([a-z0-9-]+)/i.exec(message)?.[1], message }];
    }
  };
  let values: Record<string, unknown>;
  try {
    const parsed = parseArgs({
      args: [...argv],
      options: { ...COMMON_OPTIONS, ...spec },
      allowPositionals: true,
      strict: true,
    });
    const { help: _help, debug: _debug, ...rest } = parsed.values;
    values = rest;
  } catch {
    return whole(); // the syntax itself: the command's own words
  }
  const result = schema.safeParse(values);
  if (result.success) return whole();
  return result.error.issues.map((issue) => {
    const option = issue.path.length > 0 ? String(issue.path[0]) : undefined;
    const given = option !== undefined && Object.hasOwn(values, option)
      ? values[option]
      : undefined;
    if (option !== undefined && given === undefined) {
      return { option, message: `--${option} is required` };
    }
    if (issue.code === "invalid_value" && typeof given === "string" && issue.values.length > 1) {
      const allowed = issue.values.map(String);
      const near = nearestName(given, allowed);
      return {
        option,
        message: `unknown value "${given}"${
          near !== undefined ? `; did you mean "${near}"?` : ""
        } (allowed: ${allowed.join(", ")})`,
      };
    }
    return { option, message: issue.message };
  });
}
