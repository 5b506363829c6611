/**
 * Argument parsing shared by every command: node:util parseArgs for the
 * syntax, zod for the values. Failures are usage errors (exit 2).
 *
 * @module
 */
import { parseArgs, type ParseArgsConfig } from "node:util";
import { z } from "npm:zod@4.6.7";
import { QuiverError, withFile } from "../lib/errors.ts";
import { parseDecimal } from "../lib/io/numbers.ts";
import { refuseClashingOutputs, refuseUnreplaceableOutputs } from "../lib/io/output_paths.ts";
import { nearestName } from "../lib/nearest_name.ts";

/** Option definitions in parseArgs form. */
export type OptionSpec = NonNullable<ParseArgsConfig["options"]>;

/** Options every command accepts. */
export const COMMON_OPTIONS: OptionSpec = {
  help: { type: "boolean", short: "h" },
  debug: { type: "boolean" },
};

/** Parsed, validated arguments of a command. */
export interface ParsedArgs<T> {
  /** Positional arguments. */
  readonly positionals: string[];
  /** Validated option values. */
  readonly values: T;
}

/** Raises a usage error. */
export function usageError(message: string): never {
  throw new QuiverError(message, {}, "usage");
}

/**
 * Parses `argv` against the option spec, then validates the values with the
 * zod schema (whose keys are the option names).
 *
 * @throws {QuiverError} (usage) for unknown options, missing values or values
 * the schema refuses.
 */
export function parseCommandArgs<S extends z.ZodType>(
  argv: readonly string[],
  spec: OptionSpec,
  schema: S,
): ParsedArgs<z.infer<S>> {
  let parsed;
  try {
    parsed = parseArgs({
      args: [...argv],
      options: { ...COMMON_OPTIONS, ...spec },
      allowPositionals: true,
      strict: true,
    });
  } catch (error) {
    usageError(optionProblem(error, Object.keys({ ...COMMON_OPTIONS, ...spec })));
  }
  const { help: _help, debug: _debug, ...rest } = parsed.values;
  const result = schema.safeParse(rest);
  if (!result.success) {
    // Every problem at once, so that one correction round fixes them all.
    usageError(
      result.error.issues.map((issue) => {
        const name = issue.path.map(String).join(".");
        if (name !== "" && (rest as Record<string, unknown>)[name] === undefined) {
          return `--${name} is required`;
        }
        return name === "" ? issue.message : `--${name}: ${issue.message}`;
      }).join("; "),
    );
  }
  // Before any work: no result may overwrite an input, and no two results one file.
  const values = result.data as Record<string, unknown>;
  const outputs = Object.entries(values)
    .filter(([name, value]) =>
      (name === "out" || name.endsWith("-out")) && typeof value === "string"
    )
    .map(([name, value]) => ({ option: `--${name}`, path: value as string }));
  const inputs = [...parsed.positionals];
  if (typeof values.setup === "string") inputs.push(values.setup);
  refuseClashingOutputs(outputs, inputs);
  refuseUnreplaceableOutputs(outputs);
  return { positionals: parsed.positionals, values: result.data };
}

/**
 * A zod schema reading a decimal number from an option string. Refuses the
 * empty string, NaN, Infinity and trailing text, which `Number()` would not.
 *
 * @example
 * ```ts
 * import { numberOption } from "./args.ts";
 * if (numberOption().parse(" 0.75 ") !== 0.75) throw new Error();
 * if (numberOption().safeParse("1x").success) throw new Error();
 * ```
 */
export function numberOption() {
  return z.string().transform((text, context) => {
    const value = parseDecimal(text.trim(), ".");
    if (value === undefined || !Number.isFinite(value)) {
      context.addIssue({ code: "custom", message: `"${text}" is not a number` });
      return z.NEVER;
    }
    return value;
  });
}

/**
 * A zod schema reading a positive integer from an option string.
 *
 * @example
 * ```ts
 * import { integerOption } from "./args.ts";
 * if (integerOption().parse("4096") !== 4096) throw new Error();
 * if (integerOption().safeParse("40.5").success) throw new Error();
 * ```
 */
export function integerOption() {
  return numberOption().pipe(
    z.number().int("must be a whole number").positive("must be positive"),
  );
}

/**
 * A zod schema reading a comma-separated list of names.
 *
 * @example
 * ```ts
 * import { listOption } from "./args.ts";
 * if (listOption().parse("a, b").join() !== "a,b") throw new Error();
 * ```
 */
export function listOption() {
  return z.string().transform((text, context) => {
    const names = text.split(",").map((s) => s.trim());
    if (names.some((n) => n === "")) {
      context.addIssue({ code: "custom", message: `"${text}" has an empty name` });
      return z.NEVER;
    }
    return names;
  });
}

/** Runs an analysis step and attaches `file` to the data errors it raises. */
export function inFile<T>(file: string, step: () => T): T {
  try {
    return step();
  } catch (error) {
    throw withFile(error, file);
  }
}

/** {@linkcode inFile} for an asynchronous step. */
export async function inFileAsync<T>(file: string, step: () => Promise<T>): Promise<T> {
  try {
    return await step();
  } catch (error) {
    throw withFile(error, file);
  }
}

/**
 * parseArgs' complaint in quiver's words: an unknown option with the nearest
 * valid one, an option without its value, a flag given a value.
 */
function optionProblem(error: unknown, known: readonly string[]): string {
  const message = error instanceof Error ? error.message : String(error);
  const code = (error as { code?: string }).code;
  // Node names an option as '--block <value>' or '-h, --help': keep the long form.
  const option = /'(?:-\w, )?(-{1,2}[^' ]+)/.exec(message)?.[1] ?? "";
  if (code === "ERR_PARSE_ARGS_UNKNOWN_OPTION") {
    const name = option.replace(/^-+/, "");
    const near = nearestName(name, known);
    return `unknown option ${option}${near === undefined ? "" : `; did you mean --${near}?`}` +
      " (--help lists the options)";
  }
  if (code === "ERR_PARSE_ARGS_INVALID_OPTION_VALUE") {
    if (/ambiguous/.test(message)) {
      return `${option} needs a value; for one that starts with "-" write ${option}=VALUE`;
    }
    return /argument missing/.test(message)
      ? `${option} needs a value`
      : `${option} takes no value`;
  }
  return message.split("\n")[0];
}
