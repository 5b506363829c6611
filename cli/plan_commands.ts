/**
 * The commands a plan can run, as the plan runner sees them: a dry check of
 * the arguments (each command's own option schema) and the run itself. The
 * names are the plan schema's (lib/plan/schema.ts) plus `compare` for
 * comparisons; the modules come from the one command list (commands.ts), so
 * a plan command without a command fails to compile.
 *
 * @module
 */
import type { PlanCommand } from "../lib/plan/runner.ts";
import { PLAN_COMMANDS } from "../lib/plan/schema.ts";
import { parseCommandArgs } from "./args.ts";
import { COMMANDS } from "./commands.ts";

/** The plan runner's command table (built when asked for: commands.ts imports `run`, which imports this). */
export function planCommandTable(): Readonly<Record<string, PlanCommand>> {
  const names = [...PLAN_COMMANDS, "compare"] as const;
  return Object.fromEntries(names.map((name) => {
    const command = COMMANDS[name];
    return [name, {
      validate: (argv: readonly string[]) =>
        void parseCommandArgs(argv, command.options, command.schema),
      run: command.run,
    }];
  }));
}
