/**
 * File names made from names read from data (channel names, step ids,
 * units): reduced to a portable set so that no such name can name a folder,
 * climb out of one (`..`), hide a file (a leading dot) or carry a control
 * character. OWASP, Path Traversal: build paths from an allow-list, not by
 * removing what looks dangerous.
 *
 * @module
 */

/**
 * What a derived file name does not keep: characters outside the portable
 * set, and runs of two or more dots (never a `..` in a name, even a harmless one).
 */
const NOT_PORTABLE = /[^A-Za-z0-9_.-]+|\.{2,}/g;

/** Longest name kept (bytes of ASCII), far below every common file system's 255. */
const MAX_LENGTH = 120;

/**
 * `text` reduced to a file name of letters, digits, `_`, `-` and `.`, with
 * no leading dot, no `..` and at most 120 characters; `fallback` where nothing is
 * left. Distinct names may reduce to the same file name: callers that write
 * several files use {@linkcode uniqueFileNames}.
 *
 * @example
 * ```ts
 * import { safeFileName } from "./file_name.ts";
 * if (safeFileName("a/../../../victim/pwn_spectrogram") !== "a_______victim_pwn_spectrogram") throw new Error();
 * if (safeFileName("..") !== "_") throw new Error();
 * if (safeFileName("mic [Pa]") !== "mic_Pa_") throw new Error();
 * ```
 */
export function safeFileName(text: string, fallback = "_"): string {
  const reduced = text.replace(NOT_PORTABLE, "_").replace(/^\.+/, "_").slice(0, MAX_LENGTH);
  return reduced === "" ? fallback : reduced;
}

/**
 * Safe file names for several names, distinct from each other even where two
 * names reduce alike (then `-2`, `-3`, … is added), compared without case so
 * that they stay distinct on case-insensitive file systems too.
 *
 * @example
 * ```ts
 * import { uniqueFileNames } from "./file_name.ts";
 * const names = uniqueFileNames(["a/b", "a_b", "A_B"]);
 * if (names.join(" ") !== "a_b a_b-2 A_B-3") throw new Error();
 * ```
 */
export function uniqueFileNames(names: readonly string[]): string[] {
  const taken = new Set<string>();
  return names.map((name) => {
    const base = safeFileName(name);
    let candidate = base;
    for (let k = 2; taken.has(candidate.toLowerCase()); k++) candidate = `${base}-${k}`;
    taken.add(candidate.toLowerCase());
    return candidate;
  });
}
