/**
 * Safe output: a file is written under a temporary name in the same folder
 * and renamed into place, so a killed run leaves the old file or the new
 * one, never half of one.
 *
 * @module
 */
import { open, readdir, rename, rm } from "node:fs/promises";
import { basename, dirname, join } from "node:path";
import process from "node:process";
import { assertReplaceable } from "./file_kinds.ts";

/** The prefix of every temporary file of a write to a file named `name`. */
const TEMPORARY_PREFIX = (name: string) => `.${name}.tmp-`;

/** The temporary name of a write to `path` by this process. */
function temporaryName(path: string): string {
  return join(
    dirname(path),
    `${TEMPORARY_PREFIX(basename(path))}${process.pid}-${Math.random().toString(36).slice(2)}`,
  );
}

/**
 * Writes `content` to a new temporary file beside `path`, synced to disk, and
 * returns its path; {@linkcode commitTemporary} then renames it into place.
 * Leftovers of earlier writes to `path` by processes that no longer run (a
 * killed write) are removed first.
 *
 * @throws {QuiverError} (usage) when `path` exists and is not a regular file
 * (file_kinds.ts), before anything is written.
 */
export async function writeTemporary(path: string, content: string | Uint8Array): Promise<string> {
  assertReplaceable(path, "the target");
  await removeStaleTemporaries(path);
  const temporary = temporaryName(path);
  try {
    const handle = await open(temporary, "wx");
    try {
      await handle.writeFile(content);
      await handle.sync();
    } finally {
      await handle.close();
    }
  } catch (error) {
    await rm(temporary, { force: true });
    throw error;
  }
  return temporary;
}

/**
 * Renames a temporary file from {@linkcode writeTemporary} into place. The
 * target is looked at (lstat) once more just before the rename, which would
 * otherwise replace whatever is there: a device node, a FIFO, a symbolic link
 * (a folder makes rename fail on its own).
 *
 * @throws {QuiverError} (usage) when `path` has become something other than a
 * regular file; the temporary file is removed.
 */
export async function commitTemporary(temporary: string, path: string): Promise<void> {
  try {
    assertReplaceable(path, "the target");
    await rename(temporary, path);
  } catch (error) {
    await rm(temporary, { force: true });
    throw error;
  }
}

/** Removes `.NAME.tmp-PID-…` beside `path` whose process is gone. */
async function removeStaleTemporaries(path: string): Promise<void> {
  const prefix = TEMPORARY_PREFIX(basename(path));
  let names: string[];
  try {
    names = await readdir(dirname(path));
  } catch {
    return; // the folder's absence is reported by the write itself
  }
  for (const name of names) {
    if (!name.startsWith(prefix)) continue;
    const pid = Number(name.slice(prefix.length).split("-")[0]);
    if (Number.isInteger(pid) && pid !== process.pid && !processRuns(pid)) {
      await rm(join(dirname(path), name), { force: true });
    }
  }
}

/**
 * Whether a process with this id runs on this machine (signal 0 tests
 * without sending anything; EPERM means it runs as another user).
 *
 * @example
 * ```ts
 * import { processRuns } from "./atomic_write.ts";
 * import process from "node:process";
import { assertReplaceable } from "./file_kinds.ts";
 * if (!processRuns(process.pid) || processRuns(999999999)) throw new Error();
 * ```
 */
export function processRuns(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as { code?: string }).code === "EPERM";
  }
}

/**
 * Writes `path` atomically: a temporary file in the same folder, synced, then
 * renamed over `path`. A reader sees the old content or the new, never half.
 * Leftover temporary files of killed writes to the same path are removed.
 * Only a regular file is replaced: a folder, device, FIFO, socket or symbolic
 * link at `path` is refused, so `/dev/null` stays a device even for root.
 *
 * @example
 * ```ts
 * import { writeFileAtomic } from "./atomic_write.ts";
 * import { mkdtemp, readFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFileAtomic(`${dir}/a.txt`, "one");
 * await writeFileAtomic(`${dir}/a.txt`, "two");
 * if (await readFile(`${dir}/a.txt`, "utf8") !== "two") throw new Error();
 * ```
 */
export async function writeFileAtomic(
  path: string,
  content: string | Uint8Array,
): Promise<void> {
  await commitTemporary(await writeTemporary(path, content), path);
}
