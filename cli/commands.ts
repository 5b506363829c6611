/**
 * The one list of quiver's commands, in the order of `quiver --help` and
 * README's command table: every analysis of lib/analyses.ts and the tool
 * commands below. The command line, the plan runner's table and its workers
 * all take their commands from here.
 *
 * Each command's module is loaded when it is asked for, so that
 * `quiver spectrum` does not compile the plan runner, the report or the modal
 * fit before it reads a byte.
 *
 * @module
 */
import { ANALYSES } from "../lib/analyses.ts";
import type { CommandModule } from "../lib/analysis_descriptor.ts";
import { lazyImport } from "../lib/lazy_import.ts";
export type { CommandModule } from "../lib/analysis_descriptor.ts";

/** The commands that are no analysis: a file's contents, calibration, campaigns, run against run. */
const TOOLS: Readonly<Record<string, () => Promise<CommandModule>>> = {
  info: () => lazyImport<typeof import("./info.ts")>("./info.ts", import.meta.url),
  calibrate: () => lazyImport<typeof import("./calibrate.ts")>("./calibrate.ts", import.meta.url),
  run: () => lazyImport<typeof import("./run.ts")>("./run.ts", import.meta.url),
  merge: () => lazyImport<typeof import("./merge.ts")>("./merge.ts", import.meta.url),
  report: () => lazyImport<typeof import("./report.ts")>("./report.ts", import.meta.url),
  diff: () => lazyImport<typeof import("./diff.ts")>("./diff.ts", import.meta.url),
  history: () => lazyImport<typeof import("./history.ts")>("./history.ts", import.meta.url),
};

/**
 * The order of `quiver --help` and README's command table. An analysis not
 * named here is listed after those that are.
 */
const HELP_ORDER = [
  "info",
  "spectrum",
  "spectrogram",
  "frf",
  "hammer",
  "damping",
  "modal",
  "mac",
  "bands",
  "level",
  "calibrate",
  "orders",
  "tones",
  "comfort",
  "hand-arm",
  "loudness",
  "speech",
  "paths",
  "compare",
  "run",
  "merge",
  "report",
  "diff",
  "history",
];

/** The commands, by name: each a loader of its module. */
export const COMMANDS: Readonly<Record<string, () => Promise<CommandModule>>> = (() => {
  const all = new Map<string, () => Promise<CommandModule>>(Object.entries(TOOLS));
  for (const d of ANALYSES.descriptors) all.set(d.name, d.load);
  const named = HELP_ORDER.filter((name) => all.has(name));
  const rest = [...all.keys()].filter((name) => !HELP_ORDER.includes(name));
  return Object.fromEntries([...named, ...rest].map((name) => [name, all.get(name)!]));
})();

/** A command's name. */
export type CommandName = string;

/** The command names, in the order of `quiver --help` and README's command table. */
export const COMMAND_NAMES: readonly CommandName[] = Object.keys(COMMANDS);

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
