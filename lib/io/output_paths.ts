/**
 * Guards on where results go: no output may be one of the inputs (a result
 * written over the recording it came from), and no two outputs may be one
 * file. Paths are compared by their real path, so `./a.csv`, `a.csv` and a
 * symbolic link to it are the same file. A CSV output's sidecar counts as an
 * output too.
 *
 * @module
 */
import { existsSync, realpathSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { QuiverError } from "../errors.ts";
import { assertReplaceable } from "./file_kinds.ts";

/**
 * The real path of `path`, also for a file that does not exist yet (the real
 * path of the nearest existing folder, then the rest).
 *
 * @example
 * ```ts
 * import { realPathOf } from "./output_paths.ts";
 * if (realPathOf("/tmp/./not/yet/there.csv") !== realPathOf("/tmp") + "/not/yet/there.csv") throw new Error();
 * ```
 */
export function realPathOf(path: string): string {
  const absolute = resolve(path);
  if (existsSync(absolute)) return realpathSync(absolute);
  const parent = dirname(absolute);
  if (parent === absolute) return absolute;
  return join(realPathOf(parent), basename(absolute));
}

/** The files a write to `path` makes: the file, and for CSV its sidecar. */
function written(path: string): string[] {
  return /\.json$/i.test(path) ? [path] : [path, `${path}.meta.json`];
}

/**
 * Refuses outputs that are inputs, or that coincide with each other.
 *
 * @throws {QuiverError} (usage) naming the clash.
 *
 * @example
 * ```ts
 * import { refuseClashingOutputs } from "./output_paths.ts";
 * let message = "";
 * try { refuseClashingOutputs([{ option: "--out", path: "/tmp/r.csv" }], ["/tmp/./r.csv"]); }
 * catch (e) { message = (e as Error).message; }
 * if (!message.includes("would overwrite the input")) throw new Error(message);
 * ```
 */
export function refuseClashingOutputs(
  outputs: readonly { option: string; path: string }[],
  inputs: readonly string[],
): void {
  const inputPaths = new Map<string, string>();
  for (const input of inputs) {
    inputPaths.set(realPathOf(input), input);
    inputPaths.set(realPathOf(`${input}.meta.json`), `${input}.meta.json`);
  }
  const taken = new Map<string, string>();
  for (const { option, path } of outputs) {
    for (const file of written(path)) {
      const real = realPathOf(file);
      const input = inputPaths.get(real);
      if (input !== undefined) {
        throw new QuiverError(
          `${option} ${path} would overwrite the input ${input}; write the result elsewhere`,
          {},
          "usage",
        );
      }
      const other = taken.get(real);
      if (other !== undefined && other !== option) {
        throw new QuiverError(`${option} and ${other} name the same file, ${file}`, {}, "usage");
      }
      taken.set(real, option);
    }
  }
}

/**
 * Refuses outputs (and CSV sidecars) that exist and are not regular files: a
 * folder, device, FIFO, socket or symbolic link (file_kinds.ts). Checked with
 * the options, before any work, so that a long analysis does not end in a
 * write that cannot happen.
 *
 * @throws {QuiverError} (usage) naming the option and what the path is.
 *
 * @example
 * ```ts
 * import { refuseUnreplaceableOutputs } from "./output_paths.ts";
 * let message = "";
 * try { refuseUnreplaceableOutputs([{ option: "--out", path: "/dev/null" }]); }
 * catch (e) { message = (e as Error).message; }
 * if (!message.startsWith("--out /dev/null is a character device")) throw new Error(message);
 * ```
 */
export function refuseUnreplaceableOutputs(
  outputs: readonly { option: string; path: string }[],
): void {
  for (const { option, path } of outputs) {
    for (const file of written(path)) assertReplaceable(file, option);
  }
}
