/**
 * The merge of a sharded campaign (shards.ts): the shards' partial
 * manifests in one output folder checked and joined into the one
 * `manifest.json`, targets evaluated, and the report written, as a run of
 * the whole plan on one machine would have done.
 *
 * Checked before anything is written: every shard 1 … N finished, all with
 * the same plan (by SHA-256, and the plan file unchanged since) and quiver
 * version, every step of the plan in exactly one shard, and every output
 * still the file its shard wrote (size and SHA-256). A missing or unfinished
 * shard is named; the merge then writes nothing.
 *
 * Cost: one pass over the shards' steps and one hash per output, linear in
 * the number of steps.
 *
 * @module
 */
import { readdir, readFile } from "node:fs/promises";
import { join, resolve } from "node:path";
import { QuiverError } from "../errors.ts";
import { writeFileAtomic } from "../io/atomic_write.ts";
import { sha256Hex } from "../io/table_file.ts";
import { QUIVER_VERSION } from "../version.ts";
import { type Manifest, manifestSchema } from "./manifest.ts";
import {
  loadPlan,
  MANIFEST_FILE,
  type PlanCommand,
  planSteps,
  record,
  type RunOptions,
  writeRecordedReport,
} from "./runner.ts";
import { acquireFolderLock } from "./folder_lock.ts";
import type { Plan } from "./schema.ts";
import { evaluateTargets } from "./target_eval.ts";

const SHARD_FILE = /^manifest\.shard-(\d+)-of-(\d+)\.json$/;

/** Options of {@linkcode mergeShards}. */
export interface MergeOptions {
  /** The commands by name (the plan's steps are rebuilt and checked with them). Required. */
  commands: Readonly<Record<string, PlanCommand>>;
  /** Writes the report; called when the plan has a `report` section. */
  report?: RunOptions["report"];
}

/**
 * Joins shard manifests, in the plan's step order, into one manifest's
 * steps. Pure and linear: a map from step id to its record, one pass.
 *
 * @throws {QuiverError} when a step is in no shard or in two.
 *
 * @example
 * ```ts
 * import { joinShardSteps } from "./merge.ts";
 * const step = (id: string) => ({ id, kind: "analysis", command: "spectrum", argv: [], inputs: [], outputs: {}, status: "ok" as const, seconds: 0 });
 * const steps = joinShardSteps(["a", "b", "c"], [[step("b")], [step("c"), step("a")]]);
 * if (steps.map((s) => s.id).join() !== "a,b,c") throw new Error();
 * ```
 */
export function joinShardSteps(
  order: readonly string[],
  shards: readonly (readonly Manifest["steps"][number][])[],
): Manifest["steps"] {
  const byId = new Map<string, Manifest["steps"][number]>();
  for (const steps of shards) {
    for (const step of steps) {
      if (byId.has(step.id)) {
        throw new QuiverError(`step "${step.id}" was run by two shards`);
      }
      byId.set(step.id, step);
    }
  }
  const missing = order.filter((id) => !byId.has(id));
  if (missing.length > 0) {
    throw new QuiverError(
      `no shard ran ${missing.length} step(s) of the plan (${missing.slice(0, 5).join(", ")}${
        missing.length > 5 ? ", …" : ""
      })`,
    );
  }
  return order.map((id) => byId.get(id)!);
}

/**
 * Merges the shards in `outDir` into `manifest.json` (and the report).
 *
 * @throws {QuiverError} naming the missing, unfinished or inconsistent
 * shards and the outputs that changed; nothing is written then.
 */
export async function mergeShards(outDirIn: string, options: MergeOptions): Promise<Manifest> {
  const outDir = resolve(outDirIn);
  let names: string[];
  try {
    names = (await readdir(outDir)).filter((n) => SHARD_FILE.test(n));
  } catch {
    throw new QuiverError("no such output folder", { file: outDir }, "usage");
  }
  if (names.length === 0) {
    throw new QuiverError(
      "no shard manifests (manifest.shard-K-of-N.json) here: nothing to merge",
      { file: outDir },
    );
  }
  const counts = [...new Set(names.map((n) => Number(SHARD_FILE.exec(n)![2])))];
  if (counts.length > 1) {
    throw new QuiverError(
      `shard manifests of campaigns split ${
        counts.join(" and ")
      } ways lie here side by side: run each campaign into its own folder`,
      { file: outDir },
    );
  }
  const count = counts[0];
  const problems: string[] = [];
  const manifests: Manifest[] = [];
  for (let k = 1; k <= count; k++) {
    const name = `manifest.shard-${k}-of-${count}.json`;
    let text: string;
    try {
      text = await readFile(join(outDir, name), "utf8");
    } catch {
      problems.push(`shard ${k} of ${count} is missing (no ${name})`);
      continue;
    }
    let parsed;
    try {
      parsed = manifestSchema.safeParse(JSON.parse(text));
    } catch {
      parsed = undefined;
    }
    if (parsed === undefined || !parsed.success) {
      problems.push(`shard ${k} of ${count}: ${name} is not a quiver manifest`);
      continue;
    }
    const m = parsed.data;
    if (m.status === "running" || m.status === "aborted" || m.finished === null) {
      problems.push(`shard ${k} of ${count} did not finish (its manifest says "${m.status}")`);
      continue;
    }
    manifests.push(m);
  }
  if (problems.length > 0) {
    throw new QuiverError(`cannot merge: ${problems.join("; ")}`, { file: outDir });
  }
  const first = manifests[0];
  for (const m of manifests) {
    if (m.plan.sha256 !== first.plan.sha256) {
      problems.push(
        `shard ${m.shard?.index} ran another plan (sha256 ${
          m.plan.sha256.slice(0, 12)
        }…, shard ${first.shard?.index} ${first.plan.sha256.slice(0, 12)}…)`,
      );
    }
    if (m.quiver_version !== first.quiver_version || m.quiver_version !== QUIVER_VERSION) {
      problems.push(
        `shard ${m.shard?.index} ran quiver ${m.quiver_version}; this merge is quiver ${QUIVER_VERSION}`,
      );
    }
  }
  // The plan as the shards ran it: unchanged since, so targets and report read the same plan.
  const planPath = first.plan.path;
  const { plan, text } = await loadPlan(planPath);
  if (sha256Hex(text) !== first.plan.sha256) {
    problems.push(`the plan ${planPath} changed after the shards ran`);
  }
  if (problems.length > 0) {
    throw new QuiverError(`cannot merge: ${problems.join("; ")}`, { file: outDir });
  }
  // Every path the merge writes (manifest, report, figures) checked as a run checks them.
  const order = planSteps(plan, planPath, outDir, options.commands).map((s) => s.id);
  // The folder's one lock: the campaign's own (taken over when it is this plan's), or a new one.
  const lock = await acquireFolderLock(outDir, {
    kind: "merge",
    planSha256: first.plan.sha256,
    count,
  });
  let merged = false;
  try {
    const manifest = await mergeLocked(outDir, order, manifests, plan, count, options);
    merged = true;
    return manifest;
  } finally {
    await lock.release(merged);
  }
}

async function mergeLocked(
  outDir: string,
  order: readonly string[],
  manifests: readonly Manifest[],
  plan: Plan,
  count: number,
  options: MergeOptions,
): Promise<Manifest> {
  const first = manifests[0];
  const steps = joinShardSteps(order, manifests.map((m) => m.steps));
  // Every output still the file its shard wrote.
  const changed: string[] = [];
  for (const step of steps) {
    for (const output of Object.values(step.outputs)) {
      const path = resolve(outDir, output.path);
      let now;
      try {
        now = await record(path, outDir);
      } catch {
        changed.push(`${output.path} (missing)`);
        continue;
      }
      if (now.bytes !== output.bytes || now.sha256 !== output.sha256) changed.push(output.path);
    }
  }
  if (changed.length > 0) {
    throw new QuiverError(
      `cannot merge: ${changed.length} result(s) differ from what their shard wrote (${
        changed.slice(0, 5).join(", ")
      }${changed.length > 5 ? ", …" : ""})`,
      { file: outDir },
    );
  }
  const failed = new Set(steps.filter((s) => s.status !== "ok").map((s) => s.id));
  const targets = await evaluateTargets(plan, outDir, failed);
  const { shard: _shard, ...header } = first;
  let manifest: Manifest = {
    ...header,
    started: manifests.map((m) => m.started).sort()[0],
    finished: new Date().toISOString(),
    status: failed.size > 0 ? "failed" : "ok",
    steps,
    targets,
    shards: count,
  };
  const report = options.report;
  if (plan.report !== undefined && report !== undefined) {
    const written = await writeRecordedReport(outDir, () => report(outDir, manifest, plan));
    manifest = { ...manifest, report: written.report, report_files: written.files };
  }
  await writeFileAtomic(join(outDir, MANIFEST_FILE), JSON.stringify(manifest, null, 2) + "\n");
  return manifest;
}
