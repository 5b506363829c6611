/**
 * The one list of quiver's commands, in the order of `quiver --help` and
 * README's command table. The command line, the plan runner's table and its
 * workers all take their commands from here.
 *
 * Each command's module is loaded when it is asked for, so that
 * `quiver spectrum` does not compile the plan runner, the report or the modal
 * fit before it reads a byte.
 *
 * @module
 */
import type { z } from "npm:zod@4.6.7";
import type { ParseArgsOptionsConfig } from "node:util";

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

/** The commands, by name: each a loader of its module. */
export const COMMANDS = {
  info: () => import("./info.ts"),
  spectrum: () => import("./spectrum.ts"),
  spectrogram: () => import("./spectrogram.ts"),
  frf: () => import("./frf.ts"),
  hammer: () => import("./hammer.ts"),
  damping: () => import("./damping.ts"),
  modal: () => import("./modal.ts"),
  mac: () => import("./mac.ts"),
  bands: () => import("./bands.ts"),
  level: () => import("./level.ts"),
  calibrate: () => import("./calibrate.ts"),
  orders: () => import("./orders.ts"),
  paths: () => import("./paths.ts"),
  compare: () => import("./compare.ts"),
  run: () => import("./run.ts"),
  merge: () => import("./merge.ts"),
  report: () => import("./report.ts"),
} as const satisfies Record<string, () => Promise<CommandModule>>;

/** A command's name. */
export type CommandName = keyof typeof COMMANDS;

/** The command names, in the order of `quiver --help` and README's command table. */
export const COMMAND_NAMES = Object.keys(COMMANDS) as CommandName[];

/** Whether `name` is a command. */
export function isCommandName(name: string): name is CommandName {
  return Object.hasOwn(COMMANDS, name);
}

/** Loads one command's module. */
export function loadCommand(name: CommandName): Promise<CommandModule> {
  return COMMANDS[name]();
}

/** Loads the modules of the named commands (all by default), by name. */
export async function loadCommands(
  names: readonly CommandName[] = COMMAND_NAMES,
): Promise<Record<string, CommandModule>> {
  const modules = await Promise.all(names.map((name) => loadCommand(name)));
  return Object.fromEntries(names.map((name, i) => [name, modules[i]]));
}
