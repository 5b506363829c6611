/**
 * Text for the terminal. Channel names and other values from files reach
 * messages; a name holding escape codes must not recolour, move or clear
 * the user's terminal, and a bidirectional control or zero-width character
 * must not reorder or hide what is shown, so such characters are shown
 * escaped, not sent (the same set that lib/io/names.ts refuses in names).
 *
 * @module
 */
import process from "node:process";

/**
 * `text` with every control character but line feed and tab, and every
 * bidirectional control and zero-width character, written as a visible
 * escape (`\x1b`, `\u009b`, `\u202e`).
 *
 * @example
 * ```ts
 * import { printable } from "./terminal.ts";
 * if (printable("acc\x1b[31m\n") !== "acc\\x1b[31m\n") throw new Error();
 * if (printable("a\u202eb\u200b") !== "a\\u202eb\\u200b") throw new Error();
 * ```
 */
export function printable(text: string): string {
  return text.replace(
    // deno-lint-ignore no-control-regex
    /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u061c\u200b-\u200f\u2028-\u202e\u2060\u2066-\u2069\ufeff]/g,
    (c) => {
      const code = c.charCodeAt(0);
      return code < 0x80
        ? `\\x${code.toString(16).padStart(2, "0")}`
        : `\\u${code.toString(16).padStart(4, "0")}`;
    },
  );
}

let prefix = "";

/**
 * Runs `work` with every line it writes through {@linkcode toStderr} starting
 * with `label` (a campaign step's id), so that steps running side by side
 * can be told apart in the log.
 */
export async function withStderrLabel<T>(label: string, work: () => Promise<T>): Promise<T> {
  const previous = prefix;
  prefix = label;
  try {
    return await work();
  } finally {
    prefix = previous;
  }
}

/** Writes `text` to stderr, made {@linkcode printable}, each line labelled when a label is set. */
export function toStderr(text: string): void {
  const safe = printable(text);
  process.stderr.write(
    prefix === "" ? safe : safe.replace(/^(?=.)/gm, prefix),
  );
}
