/**
 * What the history keeps of a finished run, read from its folder and
 * checked: the manifest (by its schema), the plan and every result still
 * the files the run wrote (size and SHA-256), the target verdicts those
 * results give, and the key values of each step (step_values.ts).
 *
 * @module
 */
import { createHash } from "node:crypto";
import { readFile } from "node:fs/promises";
import { join, resolve, sep } from "node:path";
import { z } from "npm:zod@4.6.7";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import { QuiverError } from "../errors.ts";
import { readResultFile } from "../io/result_file.ts";
import { realPathOf } from "../io/output_paths.ts";
import { sha256Hex } from "../io/table_file.ts";
import { MANIFEST_FILE } from "../plan/campaign_paths.ts";
import type { Manifest } from "../plan/manifest.ts";
import { readFinishedManifest } from "../plan/finished_run.ts";
import { loadPlan } from "../plan/plan_file.ts";
import { evaluateTargets } from "../plan/target_eval.ts";
import { type StepValue, stepValues } from "./step_values.ts";

/** A target's outcome as the history keeps it. */
export interface TargetValue {
  readonly id: string;
  readonly description: string;
  /** `checked` or `not_checked`. */
  readonly status: string;
  /** `pass`, `fail` or `not_checked`. */
  readonly verdict: "pass" | "fail" | "not_checked";
  /** The value checked (the worst case of a curve); null when not checked. */
  readonly value: number | null;
  /** The limit (at the worst case of a curve); null when not checked. */
  readonly limit: number | null;
  readonly margin: number | null;
  readonly unit: string | null;
  /** Why it was not checked. */
  readonly reason: string | null;
}

/** A file the history vouches for: path (as the manifest names it), size, SHA-256. */
export interface RunFile {
  readonly path: string;
  readonly bytes: number;
  readonly sha256: string;
}

/** A finished run, as the history records it. */
export interface RunRecord {
  /** The run's identity: its start, its plan's hash and its folder as the manifest says. */
  readonly key: string;
  readonly planTitle: string;
  readonly planSha256: string;
  /** The plan file's text. */
  readonly planText: string;
  readonly quiverVersion: string;
  readonly started: string;
  readonly finished: string | null;
  /** `ok` or `failed` (a step failed). */
  readonly status: string;
  readonly targets: readonly TargetValue[];
  readonly steps: readonly StepValue[];
  /** The plan, the results and the manifest's targets, as checked now. */
  readonly files: readonly RunFile[];
}

/**
 * The name under which the manifest's targets are vouched for among a run's files.
 *
 * @example
 * ```ts
 * import { TARGETS_RECORD } from "./run_record.ts";
 * if (TARGETS_RECORD !== "manifest.json (its targets)") throw new Error();
 * ```
 */
export const TARGETS_RECORD = `${MANIFEST_FILE} (its targets)`;

const targetSchema = z.object({
  id: z.string(),
  description: z.string(),
  status: z.enum(["checked", "not_checked"]),
  pass: z.boolean().optional(),
  value: z.number().optional(),
  limit: z.number().optional(),
  margin: z.number().optional(),
  unit: z.string().optional(),
  reason: z.string().optional(),
});

/**
 * The run's key: SHA-256 of its start time, plan hash and output folder
 * as its manifest records them; the same run gives the same key however
 * often it is added.
 *
 * @example
 * ```ts
 * import { runKey } from "./run_record.ts";
 * const a = runKey({ started: "2026-01-01T00:00:00Z", plan: { sha256: "ab" }, out_dir: "out" });
 * if (a.length !== 64 || a === runKey({ started: "2026-01-02T00:00:00Z", plan: { sha256: "ab" }, out_dir: "out" })) throw new Error();
 * ```
 */
export function runKey(
  manifest: Pick<Manifest, "started" | "out_dir"> & {
    plan: { sha256: string };
  },
): string {
  return createHash("sha256").update(
    `${manifest.started}\u0000${manifest.plan.sha256}\u0000${manifest.out_dir}`,
  ).digest("hex");
}

async function readManifest(runDir: string): Promise<Manifest> {
  const manifest = await readFinishedManifest(runDir, {
    missing: "not the folder of a finished run",
    unfinished: "only finished runs are recorded",
  });
  if (manifest.shard !== undefined) {
    throw new QuiverError(
      "this is one shard's manifest: merge the shards (quiver merge) and add the merged run",
      { file: runDir },
    );
  }
  return manifest;
}

/** A file as the manifest recorded it, refused when it is not that file now. */
async function checkedFile(
  path: string,
  recorded: RunFile,
): Promise<{ file: RunFile; bytes: Uint8Array }> {
  let bytes: Uint8Array;
  try {
    bytes = await readFile(path);
  } catch {
    throw new QuiverError(`${recorded.path} is missing: the run is not whole`, { file: path });
  }
  if (bytes.length !== recorded.bytes || sha256Hex(bytes) !== recorded.sha256) {
    throw new QuiverError(
      `${recorded.path} changed since the run (its hash differs from the manifest's): refused`,
      { file: path },
    );
  }
  return { file: recorded, bytes };
}

/**
 * Reads and checks a finished run's folder for the history.
 *
 * @throws {QuiverError} naming the file, for a folder without a manifest, an
 * unfinished run, a shard, a plan or result that changed since the run, or
 * target verdicts in the manifest that its results do not give.
 *
 * @example
 * ```ts
 * import { readRunRecord } from "./run_record.ts";
 * import { mkdtemp } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * let said = "";
 * try { await readRunRecord(dir); } catch (e) { said = (e as Error).message; }
 * if (!said.includes("no readable manifest.json here")) throw new Error(said);
 * ```
 */
export async function readRunRecord(
  runDir: string,
  table: AnalysisTable = ANALYSES,
): Promise<RunRecord> {
  const manifest = await readManifest(runDir);
  const files: RunFile[] = [];
  const planPath = resolve(runDir, manifest.plan.path);
  const plan = await checkedFile(planPath, manifest.plan);
  files.push(plan.file);
  const realOut = realPathOf(runDir);
  const results = new Map<string, string>();
  for (const step of manifest.steps) {
    for (const [key, output] of Object.entries(step.outputs)) {
      const path = resolve(runDir, output.path);
      if (!realPathOf(path).startsWith(realOut + sep)) {
        throw new QuiverError(`${output.path} lies outside the run's folder: refused`, {
          file: runDir,
        });
      }
      files.push((await checkedFile(path, output)).file);
      if (key === "out" && step.status === "ok") results.set(step.id, path);
    }
  }
  // The verdicts kept are the ones the checked results give, never the manifest's own words.
  const { plan: parsedPlan } = await loadPlan(planPath, table);
  const failed = new Set(manifest.steps.filter((s) => s.status !== "ok").map((s) => s.id));
  const outcomes = await evaluateTargets(parsedPlan, runDir, failed, table);
  if (JSON.stringify(outcomes) !== JSON.stringify(manifest.targets)) {
    throw new QuiverError(
      "the manifest's target verdicts are not those its results give (edited after the run?): refused",
      { file: join(runDir, MANIFEST_FILE) },
    );
  }
  const targetsText = JSON.stringify(manifest.targets);
  files.push({
    path: TARGETS_RECORD,
    bytes: new TextEncoder().encode(targetsText).length,
    sha256: sha256Hex(new TextEncoder().encode(targetsText)),
  });
  const targets = manifest.targets.map((raw) => {
    const t = targetSchema.parse(raw);
    return {
      id: t.id,
      description: t.description,
      status: t.status,
      verdict: t.status !== "checked" ? "not_checked" : t.pass === true ? "pass" : "fail",
      value: t.status === "checked" ? t.value ?? null : null,
      limit: t.status === "checked" ? t.limit ?? null : null,
      margin: t.status === "checked" ? t.margin ?? null : null,
      unit: t.unit ?? null,
      reason: t.reason ?? null,
    } satisfies TargetValue;
  });
  const steps: StepValue[] = [];
  for (const step of manifest.steps) {
    const path = results.get(step.id);
    if (path === undefined || table.get(step.command)?.quantities === undefined) continue;
    const result = await readResultFile(path);
    steps.push(...await stepValues(step.id, step.command, result, table));
  }
  return {
    key: runKey(manifest),
    planTitle: manifest.plan.title,
    planSha256: manifest.plan.sha256,
    planText: new TextDecoder().decode(plan.bytes),
    quiverVersion: manifest.quiver_version,
    started: manifest.started,
    finished: manifest.finished,
    status: manifest.status,
    targets,
    steps,
    files,
  };
}
