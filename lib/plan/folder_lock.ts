/**
 * One lock per output folder, whatever writes it: a whole run, the shards
 * of a campaign, a merge, a report. The lock is one file,
 * `.quiver-lock.json`, made whole in a temporary file and then linked to
 * its name (a link fails if the name exists, on local and network file
 * systems alike, and a reader never sees half a lock). It holds the kind of
 * run, the process id, host and start time.
 *
 * - A whole run, a merge or a report holds it alone. A lock whose process
 *   no longer runs on this host was left by a killed run: it is reported and
 *   taken over.
 * - The shards of one campaign (one plan, by SHA-256, split N ways) share
 *   it: the first shard writes it, the others join, each also holding
 *   `.quiver-lock.shard-K-of-N.json` so that one shard never runs twice at
 *   once. The campaign's lock stays until `quiver merge` has joined the
 *   shards; anything else (a whole run, shards of another plan or another
 *   N) is refused meanwhile.
 * - A lock file that is not a quiver lock (`null`, garbage) is refused with
 *   a message naming the file and how to clear it: it is never guessed at.
 *
 * @module
 */
import { link, open, readFile, rm } from "node:fs/promises";
import { hostname } from "node:os";
import { join } from "node:path";
import process from "node:process";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../errors.ts";
import { processRuns } from "../io/atomic_write.ts";

/** The lock file's name inside the output folder. */
export const LOCK_FILE = ".quiver-lock.json";

const lockSchema = z.strictObject({
  pid: z.number().int().positive(),
  host: z.string().min(1),
  started: z.string(),
  /** Locks written before kinds existed were whole runs. */
  kind: z.enum(["run", "shards", "merge", "report"]).default("run"),
  /** `shards`: the campaign's plan (SHA-256) and number of shards. */
  plan_sha256: z.string().optional(),
  shards: z.number().int().positive().optional(),
});

/** What a lock file holds. */
export type LockInfo = z.infer<typeof lockSchema>;

/** Who asks for the folder. */
export type LockPurpose =
  | { readonly kind: "run" | "report" }
  /** A merge; `planSha256` and `count` let it take over the lock of the campaign it merges. */
  | { readonly kind: "merge"; readonly planSha256?: string; readonly count?: number }
  | {
    readonly kind: "shards";
    readonly planSha256: string;
    readonly index: number;
    readonly count: number;
  };

/** A held lock. */
export interface FolderLock {
  /** The lock left by a killed run that this one took over, if any. */
  readonly stale?: LockInfo;
  /**
   * Lets the folder go. A shard removes its own shard lock only (the
   * campaign's stays for the merge); a merge that took over a campaign's
   * lock removes it only when `done` (the merge succeeded).
   */
  release(done?: boolean): Promise<void>;
}

/** The name of shard K of N's own lock file, beside the folder's lock. */
export function shardLockName(index: number, count: number): string {
  return `.quiver-lock.shard-${index}-of-${count}.json`;
}

/**
 * Takes the lock on `folder` (which must exist) for `purpose` (default a
 * whole run).
 *
 * @throws {QuiverError} (usage) when another live run holds it, or when the
 * lock file is not a quiver lock (naming the file and how to clear it).
 *
 * @example
 * ```ts
 * import { acquireFolderLock } from "./folder_lock.ts";
 * import { mkdtemp } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const lock = await acquireFolderLock(dir);
 * let refused = false;
 * try { await acquireFolderLock(dir, { kind: "shards", planSha256: "ab", index: 1, count: 2 }); }
 * catch { refused = true; }
 * await lock.release();
 * if (!refused) throw new Error();
 * ```
 */
export async function acquireFolderLock(
  folder: string,
  purpose: LockPurpose = { kind: "run" },
): Promise<FolderLock> {
  const path = join(folder, LOCK_FILE);
  const mine: LockInfo = {
    pid: process.pid,
    host: hostname(),
    started: new Date().toISOString(),
    kind: purpose.kind,
    ...(purpose.kind === "shards"
      ? { plan_sha256: purpose.planSha256, shards: purpose.count }
      : {}),
  };
  let stale: LockInfo | undefined;
  for (let attempt = 0; attempt < 3; attempt++) {
    if (await createExclusive(path, mine)) {
      if (purpose.kind === "shards") {
        const member = await takeShardLock(folder, purpose, mine, path);
        return { ...(stale !== undefined ? { stale } : {}), release: member.release };
      }
      return {
        ...(stale !== undefined ? { stale } : {}),
        release: () => rm(path, { force: true }),
      };
    }
    const holder = await readLock(path);
    if (holder === undefined) continue; // removed between our try and the read: try again
    if (holder.kind === "shards") {
      const same = (sha?: string, count?: number) =>
        sha !== undefined && sha === holder.plan_sha256 && count === holder.shards;
      if (purpose.kind === "shards" && same(purpose.planSha256, purpose.count)) {
        return takeShardLock(folder, purpose, mine, path);
      }
      if (purpose.kind === "merge" && same(purpose.planSha256, purpose.count)) {
        await refuseRunningShards(folder, holder.shards!, path);
        return { release: (done) => done === true ? rm(path, { force: true }) : Promise.resolve() };
      }
      throw new QuiverError(
        `a campaign split ${holder.shards} ways (plan sha256 ${
          (holder.plan_sha256 ?? "").slice(0, 12)
        }…, first shard started ${holder.started}) is writing this folder; finish it with quiver merge, or remove ${path} if that campaign was abandoned`,
        { file: folder },
        "usage",
      );
    }
    if (holder.host !== mine.host || processRuns(holder.pid)) {
      throw new QuiverError(
        `another quiver ${holder.kind} (process ${holder.pid} on ${holder.host}, started ${holder.started}) is writing this folder; wait for it to finish${
          holder.host !== mine.host ? `, or remove ${path} if that run is gone` : ""
        }`,
        { file: folder },
        "usage",
      );
    }
    stale = holder;
    await rm(path, { force: true });
  }
  throw new QuiverError(`could not take the lock ${path}`, { file: folder }, "usage");
}

/** Creates `path` holding `info`, whole, unless it exists. Returns false when it does. */
async function createExclusive(path: string, info: LockInfo): Promise<boolean> {
  const temporary = `${path}.${process.pid}.${crypto.randomUUID()}.tmp`;
  const handle = await open(temporary, "wx");
  try {
    await handle.writeFile(JSON.stringify(info) + "\n");
  } finally {
    await handle.close();
  }
  try {
    await link(temporary, path);
    return true;
  } catch (error) {
    if ((error as { code?: string }).code !== "EEXIST") throw error;
    return false;
  } finally {
    await rm(temporary, { force: true });
  }
}

/** The lock at `path`, undefined when it is gone; refuses one that is not a quiver lock. */
async function readLock(path: string): Promise<LockInfo | undefined> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    if ((error as { code?: string }).code === "ENOENT") return undefined;
    throw error;
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    json = undefined;
  }
  const parsed = lockSchema.safeParse(json);
  if (!parsed.success || (parsed.data.kind === "shards" && parsed.data.shards === undefined)) {
    throw new QuiverError(
      `the lock file ${path} is not a quiver lock (it holds ${
        JSON.stringify(text.slice(0, 40))
      }); if no quiver run is writing this folder, remove ${path} and run again`,
      {},
      "usage",
    );
  }
  return parsed.data;
}

/** Shard K's own lock, beside the campaign's: one shard never runs twice at once. */
async function takeShardLock(
  folder: string,
  shard: { index: number; count: number },
  mine: LockInfo,
  campaignLock: string,
): Promise<FolderLock> {
  const path = join(folder, shardLockName(shard.index, shard.count));
  let stale: LockInfo | undefined;
  for (let attempt = 0; attempt < 3; attempt++) {
    if (await createExclusive(path, mine)) {
      return {
        ...(stale !== undefined ? { stale } : {}),
        release: () => rm(path, { force: true }),
      };
    }
    const holder = await readLock(path);
    if (holder === undefined) continue;
    if (holder.host !== mine.host || processRuns(holder.pid)) {
      throw new QuiverError(
        `shard ${shard.index} of ${shard.count} is already running (process ${holder.pid} on ${holder.host}); wait for it, or remove ${path} if it is gone`,
        { file: folder },
        "usage",
      );
    }
    stale = holder;
    await rm(path, { force: true });
  }
  throw new QuiverError(`could not take the lock ${path} (${campaignLock})`, {}, "usage");
}

/** A merge waits for no shard: one still holding its lock (alive) is named. */
async function refuseRunningShards(folder: string, count: number, campaignLock: string) {
  for (let k = 1; k <= count; k++) {
    const path = join(folder, shardLockName(k, count));
    const holder = await readLock(path);
    if (holder === undefined) continue;
    if (holder.host !== hostname() || processRuns(holder.pid)) {
      throw new QuiverError(
        `shard ${k} of ${count} is still running (process ${holder.pid} on ${holder.host}); merge when it has finished (${campaignLock})`,
        { file: folder },
        "usage",
      );
    }
  }
}
