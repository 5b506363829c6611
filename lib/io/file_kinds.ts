/**
 * What a path names, told without opening it: quiver reads inputs only from
 * regular files and replaces only regular files. A FIFO would block an open
 * for reading until a writer comes (a hang), a device such as /dev/zero never
 * ends, and a folder cannot be read as a recording; renaming a result over a
 * device node or a FIFO would replace the node itself. Each is refused with
 * one line before anything is opened. A file that cannot be opened is named
 * with the reason in words ({@linkcode unreadable}).
 *
 * @module
 */
import { lstatSync, type Stats, statSync } from "node:fs";
import { resolve } from "node:path";
import { QuiverError } from "../errors.ts";

/**
 * The kind of file a stat names, in words for messages: "a regular file",
 * "a folder", "a FIFO (named pipe)", "a character device", "a block device",
 * "a socket", "a symbolic link".
 *
 * @example
 * ```ts
 * import { statSync } from "node:fs";
 * import { fileKind } from "./file_kinds.ts";
 * if (fileKind(statSync("/tmp")) !== "a folder") throw new Error();
 * ```
 */
export function fileKind(stats: Stats): string {
  if (stats.isFile()) return "a regular file";
  if (stats.isDirectory()) return "a folder";
  if (stats.isFIFO()) return "a FIFO (named pipe)";
  if (stats.isCharacterDevice()) return "a character device";
  if (stats.isBlockDevice()) return "a block device";
  if (stats.isSocket()) return "a socket";
  if (stats.isSymbolicLink()) return "a symbolic link";
  return "not a regular file";
}

/**
 * Refuses an input that is not a regular file (a symbolic link is followed:
 * a link to a regular file is read). Only `stat` is called, so a FIFO is
 * refused without the open that would wait for a writer. A path that does not
 * exist passes: the open that follows reports it in its own words.
 *
 * @param what what the file is for, in the message, e.g. "recording" or "plan input".
 * @throws {QuiverError} (usage, naming the file) for a folder, FIFO, device or socket.
 *
 * @example
 * ```ts
 * import { assertRegularFile } from "./file_kinds.ts";
 * let message = "";
 * try { assertRegularFile("/dev/zero", "recording"); } catch (e) { message = (e as Error).message; }
 * if (message !== "/dev/zero: a recording must be a regular file; this is a character device") throw new Error(message);
 * ```
 */
export function assertRegularFile(path: string, what: string): void {
  let stats: Stats;
  try {
    stats = statSync(path);
  } catch {
    return; // missing or unreadable: the open that follows says so in its own words
  }
  if (stats.isFile()) return;
  throw new QuiverError(
    `${article(what)} ${what} must be a regular file; this is ${fileKind(stats)}`,
    { file: path },
    "usage",
  );
}

/**
 * Refuses to write over `path` unless it is absent or a regular file. The
 * path itself is looked at (`lstat`): a symbolic link is refused too, rather
 * than replaced by a file (the link would be lost) or written through (the
 * result would land somewhere the command line does not name).
 *
 * @param option how the path was given, for the message, e.g. "--out".
 * @throws {QuiverError} (usage) for a folder, FIFO, device, socket or symbolic link.
 *
 * @example
 * ```ts
 * import { assertReplaceable } from "./file_kinds.ts";
 * let message = "";
 * try { assertReplaceable("/tmp", "--out"); } catch (e) { message = (e as Error).message; }
 * if (!message.startsWith("--out /tmp is a folder")) throw new Error(message);
 * assertReplaceable("/tmp/quiver-surely-not-there.csv", "--out"); // absent: fine
 * ```
 */
export function assertReplaceable(path: string, option: string): void {
  let stats: Stats;
  try {
    stats = lstatSync(path);
  } catch {
    return; // absent (or its folder missing: the write says so)
  }
  if (stats.isFile()) return;
  const why = stats.isSymbolicLink()
    ? "; quiver does not write through links (name the link's target, or remove the link)"
    : "; quiver replaces only regular files";
  throw new QuiverError(`${option} ${path} is ${fileKind(stats)}${why}`, {}, "usage");
}

/**
 * Refuses a folder path that names something other than a folder (a file,
 * FIFO, device); an absent path passes (it will be made).
 *
 * @throws {QuiverError} (usage) naming the option and what the path is.
 *
 * @example
 * ```ts
 * import { assertFolderOrAbsent } from "./file_kinds.ts";
 * assertFolderOrAbsent("/tmp", "--out-dir");
 * let message = "";
 * try { assertFolderOrAbsent("/dev/null", "--out-dir"); } catch (e) { message = (e as Error).message; }
 * if (!message.startsWith("--out-dir /dev/null is a character device, not a folder")) throw new Error(message);
 * ```
 */
export function assertFolderOrAbsent(path: string, option: string): void {
  let stats: Stats;
  try {
    stats = statSync(path);
  } catch {
    return;
  }
  if (stats.isDirectory()) return;
  throw new QuiverError(`${option} ${path} is ${fileKind(stats)}, not a folder`, {}, "usage");
}

function article(word: string): string {
  return /^[aeiou]/i.test(word) ? "an" : "a";
}

/**
 * The usage error for a file that cannot be opened: the reason in words
 * (no such file, a folder, permission denied) and the file's full path.
 *
 * @example
 * ```ts
 * import { unreadable } from "./file_kinds.ts";
 * const e = unreadable("/tmp/quiver-surely-not-there.csv", Object.assign(new Error(), { code: "ENOENT" }));
 * if (e.message !== "/tmp/quiver-surely-not-there.csv: cannot read: no such file" || e.kind !== "usage") throw new Error(e.message);
 * ```
 */
export function unreadable(path: string, error: unknown): QuiverError {
  const code = (error as { code?: string }).code;
  const why = code === "ENOENT"
    ? "no such file"
    : code === "EISDIR"
    ? "is a folder, not a file"
    : code === "EACCES"
    ? "permission denied"
    : error instanceof Error
    ? error.message
    : String(error);
  return new QuiverError(`cannot read: ${why}`, { file: resolve(path) }, "usage");
}
