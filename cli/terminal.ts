/**
 * Text for the terminal. Channel names and other values from files reach
 * messages; a name holding escape codes must not recolour, move or clear
 * the user's terminal, so control characters are shown, not sent.
 *
 * @module
 */
import process from "node:process";

/**
 * `text` with every control character but line feed and tab written as a
 * visible escape (`\x1b`, `\u009b`).
 *
 * @example
 * ```ts
 * import { printable } from "./terminal.ts";
 * if (printable("acc\x1b[31m\n") !== "acc\\x1b[31m\n") throw new Error();
 * ```
 */
export function printable(text: string): string {
  // deno-lint-ignore no-control-regex
  return text.replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g, (c) => {
    const code = c.charCodeAt(0);
    return code < 0x80
      ? `\\x${code.toString(16).padStart(2, "0")}`
      : `\\u${code.toString(16).padStart(4, "0")}`;
  });
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
