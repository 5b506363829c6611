/**
 * A plan step's options, checked before any work: those naming a file the
 * step writes are refused (the runner names every output), unknown ones are
 * named with the nearest option, and the rest go through the command's own
 * check, each problem at its option's key path.
 *
 * @module
 */
import { nearestName } from "../nearest_name.ts";
import type { OptionValue } from "./schema.ts";

/** One problem a command finds in a step's arguments: the option (without dashes) and why. */
export interface PlanOptionProblem {
  /** The option at fault; undefined for a problem of several options or of none. */
  readonly option?: string;
  readonly message: string;
}

/** What the runner needs of a command: a dry check of its arguments, and a run. */
export interface PlanCommand {
  /** Parses and validates `argv` as the command would; throws on bad options. */
  validate(argv: readonly string[]): void;
  /**
   * Every problem of `argv`, one per option, none when it would run; when
   * absent, `validate`'s first complaint is used.
   */
  problems?(argv: readonly string[]): PlanOptionProblem[];
  /** The command's option names (without dashes), to name an unknown one; absent: not checked. */
  readonly optionNames?: readonly string[];
  /** Runs the command with `argv`. */
  run(argv: readonly string[]): Promise<void>;
}

/** Notes one problem: the key path, and what is wrong there. */
export type Note = (where: string, detail: string) => void;

/** The option names a runner gives itself or refuses: not offered as suggestions. */
function isRunnerOption(name: string): boolean {
  return name === "out" || name === "format" || name.endsWith("-out") || name === "help" ||
    name === "debug";
}

/**
 * Options that would name a file the step writes (`out`, `format`, any
 * `*-out`), or a list entry holding a comma (which the command would read
 * as two entries while the runner counts one), are refused: named, and
 * their keys returned so that the command's own check leaves them out.
 */
function refuseOutputOptions(
  options: Readonly<Record<string, unknown>>,
  where: string,
  note: Note,
): Set<string> {
  const refused = new Set<string>();
  for (const [key, value] of Object.entries(options)) {
    if (key === "out" || key === "format" || key.endsWith("-out")) {
      note(
        `${where}.options.${key}`,
        "the plan runner names every file a step writes (from the step id): remove this option",
      );
      refused.add(key);
    }
    if (Array.isArray(value)) {
      const k = value.findIndex((entry) => String(entry).includes(","));
      if (k >= 0) {
        note(
          `${where}.options.${key}[${k}]`,
          `"${value[k]}" holds a comma: give each entry of the list on its own`,
        );
        refused.add(key);
      }
    }
  }
  return refused;
}

/**
 * The options the command will see: those refused or unknown are named
 * (with `note`) and left out.
 *
 * @example
 * ```ts
 * import { usableOptions } from "./step_options.ts";
 * const said: string[] = [];
 * const spectrum = { validate() {}, async run() {}, optionNames: ["kind", "block", "out"] };
 * const usable = usableOptions({ kind: "rms", blok: 4096, out: "x.json" }, "spectrum", "analyses[0]",
 *   { spectrum }, (where, detail) => said.push(`${where}: ${detail}`));
 * if (Object.keys(usable).join() !== "kind") throw new Error();
 * if (said[1] !== 'analyses[0].options.blok: spectrum has no option "blok"; did you mean "block"?') throw new Error(said[1]);
 * ```
 */
export function usableOptions(
  options: Readonly<Record<string, OptionValue>>,
  command: string,
  where: string,
  commands: Readonly<Record<string, PlanCommand>>,
  note: Note,
): Record<string, OptionValue> {
  const refused = refuseOutputOptions(options, where, note);
  const names = Object.hasOwn(commands, command) ? commands[command].optionNames : undefined;
  const usable: Record<string, OptionValue> = {};
  for (const [key, value] of Object.entries(options)) {
    if (refused.has(key)) continue;
    if (names !== undefined && !names.includes(key)) {
      const offered = names.filter((n) => !isRunnerOption(n));
      const near = nearestName(key, offered);
      note(
        `${where}.options.${key}`,
        `${command} has no option "${key}"${
          near !== undefined ? `; did you mean "${near}"?` : ` (its options: ${offered.join(", ")})`
        }`,
      );
      continue;
    }
    usable[key] = value;
  }
  return usable;
}

/**
 * The command's own check of a step's arguments, each problem noted at its
 * option's key path; `given` names options the runner would give from a
 * reference that failed (named there already, so not again).
 */
export function checkArguments(
  where: string,
  command: string,
  argv: readonly string[],
  commands: Readonly<Record<string, PlanCommand>>,
  note: Note,
  given: ReadonlySet<string> = new Set(),
): void {
  const c = Object.hasOwn(commands, command) ? commands[command] : undefined;
  if (c === undefined) {
    note(`${where}.command`, `unknown command "${command}"`);
    return;
  }
  let found: PlanOptionProblem[];
  if (c.problems !== undefined) found = c.problems(argv);
  else {
    try {
      c.validate(argv);
      found = [];
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      found = [{ option: /--([a-z0-9-]+)/i.exec(message)?.[1], message }];
    }
  }
  for (const p of found) {
    if (p.option !== undefined && given.has(p.option)) continue;
    note(p.option !== undefined ? `${where}.options.${p.option}` : `${where}.options`, p.message);
  }
}
