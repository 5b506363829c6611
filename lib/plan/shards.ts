/**
 * Campaigns larger than one machine: the plan's steps split into N
 * independent shards, each run anywhere (a cluster's job array) into one
 * shared output folder, and their partial manifests merged into one.
 *
 * The rule (deterministic, from the plan alone): steps joined by what they
 * need (a comparison and its analysis; damping, modal, mac and paths and
 * the FRFs they read) form one group, which is never split; groups are
 * dealt largest first (by the bytes of their recordings, ties in plan order)
 * to the shard with the least so far (ties to the one with fewer groups,
 * then the lowest). Targets
 * read results of any step, so they are evaluated at the merge.
 *
 * @module
 */
import { existsSync, statSync } from "node:fs";
import { QuiverError } from "../errors.ts";

/** A shard: `index` of `count`, 1-based. */
export interface Shard {
  /** 1 … count. */
  readonly index: number;
  /** Number of shards, at least 1. */
  readonly count: number;
}

/**
 * Parses `K/N`, or `auto` from a Slurm job array's environment
 * (SLURM_ARRAY_TASK_ID counted from SLURM_ARRAY_TASK_MIN, N from
 * SLURM_ARRAY_TASK_COUNT).
 *
 * @throws {QuiverError} (usage) for anything else, or `auto` outside a job array.
 *
 * @example
 * ```ts
 * import { parseShard } from "./shards.ts";
 * const s = parseShard("2/5");
 * if (s.index !== 2 || s.count !== 5) throw new Error();
 * const a = parseShard("auto", { SLURM_ARRAY_TASK_ID: "7", SLURM_ARRAY_TASK_MIN: "5", SLURM_ARRAY_TASK_COUNT: "4" });
 * if (a.index !== 3 || a.count !== 4) throw new Error();
 * ```
 */
export function parseShard(
  text: string,
  env: Readonly<Record<string, string | undefined>> = {},
): Shard {
  if (text === "auto") {
    const id = Number(env.SLURM_ARRAY_TASK_ID);
    const min = Number(env.SLURM_ARRAY_TASK_MIN ?? "1");
    const count = Number(env.SLURM_ARRAY_TASK_COUNT);
    if (!Number.isInteger(id) || !Number.isInteger(min) || !Number.isInteger(count)) {
      throw new QuiverError(
        "--shard auto reads SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_MIN and SLURM_ARRAY_TASK_COUNT, which are not set: it runs inside a Slurm job array only",
        {},
        "usage",
      );
    }
    return checked(id - min + 1, count, text);
  }
  const match = /^(\d+)\/(\d+)$/.exec(text);
  if (match === null) {
    throw new QuiverError(`--shard "${text}": expected K/N (e.g. 2/5) or auto`, {}, "usage");
  }
  return checked(Number(match[1]), Number(match[2]), text);
}

function checked(index: number, count: number, text: string): Shard {
  if (!(count >= 1) || !(index >= 1 && index <= count)) {
    throw new QuiverError(
      `--shard ${text}: the shard must be between 1 and the number of shards (${count})`,
      {},
      "usage",
    );
  }
  return { index, count };
}

/** The name of a shard's partial manifest. */
export function shardManifestName(shard: Shard): string {
  return `manifest.shard-${shard.index}-of-${shard.count}.json`;
}

/** What the assignment needs of a step. */
export interface ShardableStep {
  readonly id: string;
  readonly needs: readonly string[];
  /** Files the step reads (their sizes weigh its group, unless a step writes them). */
  readonly inputs: readonly string[];
  /** Files the step writes. Default none. */
  readonly outputs?: Readonly<Record<string, string>>;
}

/**
 * The shard (1-based) of every step, by the module's rule. Only the plan's
 * own inputs weigh: a file some step writes counts nothing, so every shard
 * computes the same assignment whatever the others have written by then.
 *
 * @example
 * ```ts
 * import { assignShards } from "./shards.ts";
 * const steps = [
 *   { id: "a", needs: [], inputs: [] }, { id: "b", needs: [], inputs: [] },
 *   { id: "a_modes", needs: ["a"], inputs: [] },
 * ];
 * const shards = assignShards(steps, 2);
 * if (shards[2] !== shards[0] || shards[1] === shards[0]) throw new Error();
 * ```
 */
export function assignShards(
  steps: readonly ShardableStep[],
  count: number,
  sizeOf: (path: string) => number = fileSize,
): number[] {
  const produced = new Set(steps.flatMap((s) => Object.values(s.outputs ?? {})));
  const weight = (path: string) => (produced.has(path) ? 0 : sizeOf(path));
  // Union–find over the needs: a group is a connected set of steps.
  const parent = steps.map((_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) {
      parent[i] = parent[parent[i]];
      i = parent[i];
    }
    return i;
  };
  const indexOf = new Map(steps.map((s, i) => [s.id, i]));
  steps.forEach((s, i) => {
    for (const need of s.needs) {
      const j = indexOf.get(need);
      if (j !== undefined) parent[find(i)] = find(j);
    }
  });
  const groups = new Map<number, { first: number; members: number[]; files: Set<string> }>();
  steps.forEach((s, i) => {
    const root = find(i);
    let group = groups.get(root);
    if (group === undefined) {
      group = { first: i, members: [], files: new Set() };
      groups.set(root, group);
    }
    group.members.push(i);
    for (const input of s.inputs) group.files.add(input);
  });
  const weighed = [...groups.values()].map((g) => ({
    ...g,
    weight: [...g.files].reduce((sum, f) => sum + weight(f), 0),
  })).sort((a, b) => b.weight - a.weight || a.first - b.first);
  const load = new Array(count).fill(0);
  const taken = new Array(count).fill(0); // groups per shard: the tie-break where loads are equal
  const shardOf = new Array(steps.length).fill(0);
  for (const g of weighed) {
    let best = 0;
    for (let k = 1; k < count; k++) {
      if (load[k] < load[best] || (load[k] === load[best] && taken[k] < taken[best])) best = k;
    }
    load[best] += g.weight;
    taken[best]++;
    for (const m of g.members) shardOf[m] = best + 1;
  }
  return shardOf;
}

/** Bytes of a file, 0 when it does not exist (yet: a result of another step). */
function fileSize(path: string): number {
  return existsSync(path) ? statSync(path).size : 0;
}
