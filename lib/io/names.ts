/**
 * Names read from files (channel and column names, set-up renames) are
 * shown as they are, so they must hold only characters that show as
 * themselves: a control character (an ESC would recolour or clear a
 * terminal, a BEL ring it, and both would reach output CSV headers), a
 * bidirectional control (which reorders the text around it, "Trojan
 * Source", CVE-2021-42574) or a zero-width character (two names that look
 * the same) is refused when the file is read, with the name shown escaped.
 *
 * @module
 */
import { type ErrorLocation, QuiverError } from "../errors.ts";

/**
 * The characters a name may not hold: C0 and C1 controls and DEL (Unicode
 * category Cc), the bidirectional controls (Unicode Standard Annex #9:
 * U+061C, U+200E/F, U+202A–U+202E, U+2066–U+2069), the zero-width
 * characters (U+200B–U+200D, U+2060, U+FEFF) and the line and paragraph
 * separators (U+2028/9).
 */
const UNSHOWABLE =
  // deno-lint-ignore no-control-regex
  /[\u0000-\u001f\u007f-\u009f\u061c\u200b-\u200f\u2028-\u202e\u2060\u2066-\u2069\ufeff]/g;

/**
 * `text` with every character a name may not hold written as `\uXXXX`.
 *
 * @example
 * ```ts
 * import { escapeName } from "./names.ts";
 * if (escapeName("acc\x1b[31m") !== "acc\\u001b[31m" || escapeName("a\u202eb") !== "a\\u202eb") throw new Error();
 * ```
 */
export function escapeName(text: string): string {
  return text.replace(
    UNSHOWABLE,
    (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, "0")}`,
  );
}

/**
 * Whether `text` holds only characters that show as themselves (see
 * {@linkcode checkName}); `allowNewlines` lets line feeds through, for
 * free text such as a description.
 *
 * @example
 * ```ts
 * import { isShowable } from "./names.ts";
 * if (!isShowable("Tamarack E5, build 2") || isShowable("a\u202eb") || !isShowable("a\nb", true)) throw new Error();
 * ```
 */
export function isShowable(text: string, allowNewlines = false): boolean {
  UNSHOWABLE.lastIndex = 0;
  const checked = allowNewlines ? text.replaceAll("\n", "") : text;
  const found = UNSHOWABLE.test(checked);
  UNSHOWABLE.lastIndex = 0;
  return !found;
}

/**
 * Checks a name read from a file.
 *
 * @throws {QuiverError} (data) at `where`, naming `what` and showing the
 * name escaped, when it holds a control, bidirectional or zero-width
 * character.
 *
 * @example
 * ```ts
 * import { checkName } from "./names.ts";
 * checkName("a[1]", "column 2");
 * let refused = false;
 * try { checkName("b\x07", "column 3", { line: 1, column: 3 }); } catch (e) { refused = String(e).includes("\\u0007"); }
 * if (!refused) throw new Error();
 * ```
 */
export function checkName(name: string, what: string, where: ErrorLocation = {}): void {
  UNSHOWABLE.lastIndex = 0;
  if (!UNSHOWABLE.test(name)) return;
  UNSHOWABLE.lastIndex = 0;
  throw new QuiverError(
    `${what}: the name "${
      escapeName(name)
    }" holds a control, bidirectional or zero-width character; names must show as what they are (rename it in the file)`,
    where,
  );
}
