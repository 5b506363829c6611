/**
 * One declaration per command-line option: its flag, its schema (from the
 * text on the command line to the value), its help text and default, and the
 * library option it feeds. The parseArgs spec, the zod schema (which the
 * plan runner also validates plan options with), the `--help` text and the
 * library options object are all derived from it, so adding an option is
 * one entry.
 *
 * By convention an option feeds the library option of its camel-case name
 * (`--rpm-min` → `rpmMin`); `feeds` names another.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import type { OptionSpec } from "./args.ts";
import type { SideOutput } from "../lib/analysis_descriptor.ts";

/** One option. */
export interface OptionEntry<S extends z.ZodType = z.ZodType> {
  /** Reads the option's text (or `true` for a flag) into its value. */
  readonly schema: S;
  /** A switch without a value (`--db`). Default false. */
  readonly flag?: boolean;
  /** The value's placeholder in the help, e.g. `N` or `a,b`. Default `X` (none for a flag). */
  readonly value?: string;
  /** What it does; further lines continue under the first. */
  readonly help: string;
  /** The default as the help shows it. Default: none shown. */
  readonly default?: string;
  /** The command refuses to run without it. Default false. */
  readonly required?: boolean;
  /** The library option it feeds, when not the camel-case of its name. */
  readonly feeds?: string;
  /** Shown in the help on one line with another, e.g. `--rpm-min R, --rpm-max R`. Default: its own line. */
  readonly helpWith?: string;
}

/**
 * A command's options (or one group of them), by flag name without the dashes;
 * an analysis's side outputs (lib/analysis_descriptor.ts, `sideOutput`) among them.
 */
export type OptionTable = Readonly<Record<string, OptionEntry | SideOutput>>;

/**
 * Declares an option, keeping the schema's type and whether it is required.
 *
 * @example
 * ```ts
 * import { z } from "npm:zod@4.6.7";
 * import { option } from "./option_table.ts";
 * const kind = option(z.enum(["psd", "rms"]), { value: "K", help: "spectrum kind", default: "psd" });
 * if (kind.schema.parse("rms") !== "rms" || kind.required !== false) throw new Error();
 * ```
 */
export function option<S extends z.ZodType, R extends boolean = false, F extends string = never>(
  schema: S,
  entry: Omit<OptionEntry<S>, "schema" | "required" | "feeds"> & { required?: R; feeds?: F },
):
  & OptionEntry<S>
  & { readonly required: R }
  & ([F] extends [never] ? unknown : { readonly feeds: F }) {
  return { ...entry, schema, required: (entry.required ?? false) as R } as
    & OptionEntry<S>
    & { readonly required: R }
    & ([F] extends [never] ? unknown : { readonly feeds: F });
}

type Shape<T extends OptionTable> = {
  [K in keyof T]: T[K] extends SideOutput ? z.ZodOptional<z.ZodString>
    : T[K] extends OptionEntry ? T[K] extends { required: true } ? T[K]["schema"]
      : z.ZodOptional<T[K]["schema"]>
    : never;
};

/**
 * The zod shape of a table: each option's schema, optional unless required.
 *
 * @example
 * ```ts
 * import { z } from "npm:zod@4.6.7";
 * import { option, shapeOf } from "./option_table.ts";
 * const schema = z.strictObject(shapeOf({ db: option(z.boolean(), { flag: true, help: "in dB" }) }));
 * if (schema.parse({}).db !== undefined || schema.parse({ db: true }).db !== true) throw new Error();
 * ```
 */
export function shapeOf<T extends OptionTable>(table: T): Shape<T> {
  const shape: Record<string, z.ZodType> = {};
  for (const [name, entry] of Object.entries(table)) {
    // A side output is a file name (its descriptor carries no schema: it loads no zod).
    const schema = "schema" in entry ? entry.schema : z.string().min(1);
    shape[name] = entry.required === true ? schema : schema.optional();
  }
  return shape as Shape<T>;
}

/**
 * The parseArgs spec of a table: flags are booleans, everything else text.
 *
 * @example
 * ```ts
 * import { z } from "npm:zod@4.6.7";
 * import { option, specOf } from "./option_table.ts";
 * const spec = specOf({ db: option(z.boolean(), { flag: true, help: "in dB" }), block: option(z.string(), { help: "samples" }) });
 * if (spec.db.type !== "boolean" || spec.block.type !== "string") throw new Error();
 * ```
 */
export function specOf(table: OptionTable): OptionSpec {
  const spec: OptionSpec = {};
  for (const [name, entry] of Object.entries(table)) {
    spec[name] = { type: entry.flag === true ? "boolean" : "string" };
  }
  return spec;
}

const LEFT = 23; // help text starts in this column
const WIDTH = 79;

/**
 * The help lines of a table under a heading: `  --name VALUE   help  (default D)`,
 * the default at the right edge when it fits, continuation lines indented.
 *
 * @example
 * ```ts
 * import { z } from "npm:zod@4.6.7";
 * import { helpOf, option } from "./option_table.ts";
 * const text = helpOf("Analysis", { block: option(z.string(), { value: "N", help: "samples per block", default: "4096" }) });
 * if (!/^Analysis:\n  --block N {12}samples per block +\(default 4096\)$/.test(text)) throw new Error(text);
 * ```
 */
export function helpOf(heading: string | undefined, table: OptionTable): string {
  const lines: string[] = heading === undefined ? [] : [`${heading}:`];
  const joined = new Set(Object.values(table).flatMap((e) => e.helpWith ?? []));
  for (const [name, entry] of Object.entries(table)) {
    if (joined.has(name)) continue;
    const flagText = (n: string, e: OptionEntry | SideOutput) =>
      `--${n}${e.flag === true ? "" : ` ${e.value ?? "X"}`}`;
    let left = `  ${flagText(name, entry)}`;
    if (entry.helpWith !== undefined) {
      left += `, ${flagText(entry.helpWith, table[entry.helpWith])}`;
    }
    const text = entry.help.split("\n");
    const tail = entry.default !== undefined
      ? `(default ${entry.default})`
      : entry.required === true
      ? "(required)"
      : "";
    const first = left.length <= LEFT - 1 ? left.padEnd(LEFT) : undefined;
    if (first === undefined) lines.push(left);
    text.forEach((line, i) => {
      const start = i === 0 && first !== undefined ? first : " ".repeat(LEFT);
      const isLast = i === text.length - 1;
      const body = start + line;
      if (!isLast || tail === "") lines.push(body);
      else if (body.length + 2 + tail.length <= WIDTH) {
        lines.push(body + " ".repeat(WIDTH - body.length - tail.length) + tail);
      } else {
        lines.push(body, " ".repeat(Math.max(LEFT, WIDTH - tail.length)) + tail);
      }
    });
  }
  return lines.join("\n");
}

type Camel<S extends string> = S extends `${infer H}-${infer T}` ? `${H}${Capitalize<Camel<T>>}`
  : S;

type LibraryKey<K, E> = E extends { feeds: infer F extends string } ? F : Camel<K & string>;

/** The library options a table feeds, typed from the parsed values. */
export type LibraryOptions<T extends OptionTable, V> = {
  [K in keyof T & keyof V as LibraryKey<K, T[K]>]: V[K];
};

/**
 * The library options object of a table's options among the parsed values:
 * each under its camel-case name (or `feeds`). Options not given stay
 * undefined, so the library's own defaults apply.
 *
 * @example
 * ```ts
 * import { z } from "npm:zod@4.6.7";
 * import { libraryOptions, option } from "./option_table.ts";
 * const table = { "rpm-min": option(z.number(), { help: "lowest" }), orders: option(z.number(), { help: "lines", feeds: "orderLines" }) };
 * const o = libraryOptions(table, { "rpm-min": 900, orders: 2, out: "x.csv" });
 * if (o.rpmMin !== 900 || o.orderLines !== 2 || "out" in o) throw new Error();
 * ```
 */
export function libraryOptions<T extends OptionTable, V extends Partial<Record<keyof T, unknown>>>(
  table: T,
  values: V,
): LibraryOptions<T, V> {
  const out: Record<string, unknown> = {};
  for (const [name, entry] of Object.entries(table)) {
    const key = ("feeds" in entry ? entry.feeds : undefined) ??
      name.replace(/-([a-z])/g, (_, c: string) => c.toUpperCase());
    out[key] = (values as Record<string, unknown>)[name];
  }
  return out as LibraryOptions<T, V>;
}

/** The parts of a command's help. */
export interface CommandHelp {
  /** The usage line, e.g. `quiver spectrum IN [options]`. */
  readonly usage: string;
  /** What the command does, a paragraph or two. */
  readonly about: string;
  /** The option groups in order: heading and table. */
  readonly groups: readonly (readonly [string | undefined, OptionTable])[];
  /** What follows the options (columns, caveats). Default: nothing. */
  readonly notes?: string;
}

/**
 * A command's `--help` text, its option lines made from the tables.
 *
 * @example
 * ```ts
 * import { z } from "npm:zod@4.6.7";
 * import { commandHelp, option } from "./option_table.ts";
 * const text = commandHelp({ usage: "quiver x IN", about: "Does x.", groups: [["Output", { out: option(z.string(), { value: "FILE", help: "write here" }) }]] });
 * if (!text.startsWith("quiver x IN\n\nDoes x.\n\nOutput:\n  --out FILE") || !text.endsWith("\n")) throw new Error();
 * ```
 */
export function commandHelp(parts: CommandHelp): string {
  const groups = parts.groups.map(([heading, table]) => helpOf(heading, table)).join("\n\n");
  return `${parts.usage}\n\n${parts.about}\n\n${groups}\n${
    parts.notes === undefined ? "" : `\n${parts.notes}\n`
  }`;
}
