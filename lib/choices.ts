/**
 * Narrowing user-supplied strings to one of a fixed set of names.
 *
 * @module
 */

/**
 * Returns `value` typed as one of `choices`, or throws.
 *
 * @throws {RangeError} naming the value and the allowed ones.
 *
 * @example
 * ```ts
 * import { parseChoice } from "./choices.ts";
 * const kind = parseChoice("rms", ["psd", "rms"] as const, "spectrum kind");
 * if (kind !== "rms") throw new Error();
 * ```
 */
export function parseChoice<T extends string>(
  value: string,
  choices: readonly T[],
  what: string,
): T {
  if ((choices as readonly string[]).includes(value)) return value as T;
  throw new RangeError(`unknown ${what} "${value}"; expected one of ${choices.join(", ")}`);
}
