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
import { loadCommands } from "./commands.ts";

/** The plan runner's command table, with the modules of the plan's commands loaded. */
export async function planCommandTable(): Promise<Readonly<Record<string, PlanCommand>>> {
  const names = [...PLAN_COMMANDS, "compare"] as const;
  const modules = await loadCommands(names);
  return Object.fromEntries(names.map((name) => {
    const command = modules[name];
    return [name, {
      validate: (argv: readonly string[]) =>
        void parseCommandArgs(argv, command.options, command.schema),
      run: command.run,
    }];
  }));
}
