/**
 * One run at a time in an output folder: `run` takes a lock file,
 * `.quiver-lock.json`, created exclusively, holding the process id, host and
 * start time. A second run finds it and stops with a clear error. A lock
 * whose process no longer runs on this host was left by a killed run: it is
 * reported and taken over.
 *
 * @module
 */
import { open, readFile, rm } from "node:fs/promises";
import { hostname } from "node:os";
import { join } from "node:path";
import process from "node:process";
import { QuiverError } from "../errors.ts";
import { processRuns } from "../io/atomic_write.ts";

/** The lock file's name inside the output folder. */
export const LOCK_FILE = ".quiver-lock.json";

/** What a lock file holds. */
interface LockInfo {
  pid: number;
  host: string;
  started: string;
}

/** A held lock. */
export interface FolderLock {
  /** The lock left by a killed run that this one took over, if any. */
  readonly stale?: LockInfo;
  /** Removes the lock file. */
  release(): Promise<void>;
}

/**
 * Takes the lock on `folder` (which must exist). A shard of a campaign takes
 * its own lock file, so shards share a folder but never a lock.
 *
 * @throws {QuiverError} (usage) when another live run holds it.
 *
 * @example
 * ```ts
 * import { acquireFolderLock } from "./folder_lock.ts";
 * import { mkdtemp } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const lock = await acquireFolderLock(dir);
 * let refused = false;
 * try { await acquireFolderLock(dir); } catch { refused = true; }
 * await lock.release();
 * if (!refused) throw new Error();
 * ```
 */
export async function acquireFolderLock(
  folder: string,
  lockFile: string = LOCK_FILE,
): Promise<FolderLock> {
  const path = join(folder, lockFile);
  const mine: LockInfo = { pid: process.pid, host: hostname(), started: new Date().toISOString() };
  let stale: LockInfo | undefined;
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const handle = await open(path, "wx");
      try {
        await handle.writeFile(JSON.stringify(mine) + "\n");
      } finally {
        await handle.close();
      }
      return {
        ...(stale !== undefined ? { stale } : {}),
        release: () => rm(path, { force: true }),
      };
    } catch (error) {
      if ((error as { code?: string }).code !== "EEXIST") throw error;
    }
    let holder: LockInfo | undefined;
    try {
      holder = JSON.parse(await readFile(path, "utf8")) as LockInfo;
    } catch {
      holder = undefined; // unreadable: a write killed half-way; treat as stale
    }
    if (holder !== undefined && (holder.host !== mine.host || processRuns(holder.pid))) {
      throw new QuiverError(
        `another quiver run (process ${holder.pid} on ${holder.host}, started ${holder.started}) is writing this folder; wait for it to finish${
          holder.host !== mine.host ? `, or remove ${lockFile} if that run is gone` : ""
        }`,
        { file: folder },
        "usage",
      );
    }
    stale = holder ?? { pid: 0, host: mine.host, started: "unknown" };
    await rm(path, { force: true });
  }
  throw new QuiverError(`could not take the lock ${path}`, { file: folder }, "usage");
}
