/**
 * The two runs `quiver diff` compares, read as far as they can be trusted:
 * each folder's manifest (lib/plan/manifest.ts), its plan (what each step
 * ran with, checked against the hash the manifest holds), and the pairing
 * of their steps by id. A step is compared when both runs ran it with the
 * same command, options and inputs of earlier steps; titles, recordings and
 * builds differ by design. A result is read only when its bytes still have
 * the SHA-256 its manifest recorded.
 *
 * @module
 */
import { readFile } from "node:fs/promises";
import { basename, isAbsolute, join, resolve } from "node:path";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../errors.ts";
import { sha256Hex } from "../io/table_file.ts";
import type { Manifest } from "../plan/manifest.ts";
import { readFinishedManifest } from "../plan/finished_run.ts";

/** One step of a run as the diff sees it. */
export interface RunStep {
  readonly id: string;
  readonly command: string;
  /** What the plan gave it besides its title and recording (canonical JSON). */
  readonly setting: string;
  readonly status: Manifest["steps"][number]["status"];
  /** Its main result file (`out`), with the size and hash the manifest recorded. */
  readonly result?: { readonly path: string; readonly sha256: string };
}

/** A finished run, read from its folder. */
export interface RunRead {
  readonly dir: string;
  readonly manifest: Manifest;
  readonly title: string;
  readonly steps: ReadonlyMap<string, RunStep>;
}

const planSchema = z.looseObject({
  title: z.string().optional(),
  analyses: z.array(z.looseObject({ id: z.string(), command: z.string() })).optional(),
  comparisons: z.array(z.looseObject({ id: z.string() })).optional(),
});

/** Keys of a plan step that differ by design between builds (not compared). */
const BY_DESIGN = new Set(["title", "description", "recording"]);

/** JSON with object keys sorted, so that equal settings read equal. */
function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(",")}]`;
  if (value !== null && typeof value === "object") {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([k]) => !BY_DESIGN.has(k))
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(",")}}`;
  }
  return JSON.stringify(value);
}

/** The plan file of a run: where the manifest says, else beside the manifest (a moved folder). */
async function readPlan(
  dir: string,
  manifest: Manifest,
): Promise<{ path: string; bytes: Uint8Array }> {
  const recorded = manifest.plan.path;
  const candidates = isAbsolute(recorded)
    ? [recorded, join(dir, basename(recorded))]
    : [join(dir, recorded)];
  for (const path of candidates) {
    let bytes: Uint8Array;
    try {
      bytes = await readFile(path);
    } catch {
      continue;
    }
    if (sha256Hex(bytes) === manifest.plan.sha256) return { path, bytes };
  }
  throw new QuiverError(
    `the run's plan ${recorded} is missing or changed since the run (its SHA-256 is not the manifest's); the diff trusts no step of it`,
    { file: join(dir, "manifest.json") },
    "data",
  );
}

/**
 * Reads the finished run in `dir`: its manifest, its plan (hash checked),
 * and its steps with what each ran with.
 *
 * @throws {QuiverError} (data) for a folder without a valid manifest, a
 * run that did not finish, or a plan that changed since.
 */
export async function readRun(dir: string): Promise<RunRead> {
  const manifest = await readFinishedManifest(dir, {
    missing: "not the folder of a finished quiver run",
    unfinished: "compare finished runs only",
  });
  const plan = await readPlan(dir, manifest);
  const planData = planSchema.safeParse(JSON.parse(new TextDecoder().decode(plan.bytes)));
  if (!planData.success) throw new QuiverError("not a quiver plan", { file: plan.path }, "data");
  const settings = new Map<string, string>();
  for (const s of [...(planData.data.analyses ?? []), ...(planData.data.comparisons ?? [])]) {
    settings.set(s.id, canonical(s));
  }
  const steps = new Map<string, RunStep>();
  for (const s of manifest.steps) {
    const out = s.outputs.out;
    steps.set(s.id, {
      id: s.id,
      command: s.command,
      setting: settings.get(s.id) ?? canonical({ command: s.command }),
      status: s.status,
      result: out === undefined
        ? undefined
        : { path: isAbsolute(out.path) ? out.path : resolve(dir, out.path), sha256: out.sha256 },
    });
  }
  return { dir, manifest, title: manifest.plan.title, steps };
}

/**
 * The bytes of a step's result, refused when they are not those its
 * manifest recorded.
 *
 * @throws {QuiverError} (data) naming the file when it is missing or its SHA-256 differs.
 */
export async function trustedResult(step: RunStep): Promise<Uint8Array> {
  if (step.result === undefined) throw new Error(`step "${step.id}" has no result file`);
  let bytes: Uint8Array;
  try {
    bytes = await readFile(step.result.path);
  } catch {
    throw new QuiverError(
      `the result of step "${step.id}" is missing`,
      { file: step.result.path },
      "data",
    );
  }
  if (sha256Hex(bytes) !== step.result.sha256) {
    throw new QuiverError(
      `the result of step "${step.id}" changed since its run (its SHA-256 is not the manifest's); the diff does not trust it`,
      { file: step.result.path },
      "data",
    );
  }
  return bytes;
}

/** How the steps of two runs pair up. */
export interface StepPairing {
  /** Steps both ran alike (same command and setting), both finished ok, in the baseline's order. */
  readonly shared: readonly { readonly baseline: RunStep; readonly candidate: RunStep }[];
  /** Steps paired by id that cannot be compared, and why. */
  readonly differing: readonly { readonly id: string; readonly why: string }[];
  readonly onlyBaseline: readonly string[];
  readonly onlyCandidate: readonly string[];
}

/**
 * Pairs the steps of two runs by id.
 *
 * @example
 * ```ts
 * import { pairSteps } from "./run_diff_inputs.ts";
 * const step = (id: string, setting: string) => ({ id, command: "spectrum", setting, status: "ok" as const });
 * const run = (...s: ReturnType<typeof step>[]) => ({ steps: new Map(s.map((x) => [x.id, x])) });
 * const p = pairSteps(run(step("a", "1"), step("b", "1"), step("c", "1")), run(step("a", "1"), step("b", "2"), step("d", "1")));
 * if (p.shared.length !== 1 || p.differing[0].id !== "b" || p.onlyBaseline.join() !== "c" || p.onlyCandidate.join() !== "d") throw new Error();
 * ```
 */
export function pairSteps(
  baseline: Pick<RunRead, "steps">,
  candidate: Pick<RunRead, "steps">,
): StepPairing {
  const shared: { baseline: RunStep; candidate: RunStep }[] = [];
  const differing: { id: string; why: string }[] = [];
  const onlyBaseline: string[] = [];
  for (const [id, b] of baseline.steps) {
    const c = candidate.steps.get(id);
    if (c === undefined) onlyBaseline.push(id);
    else if (b.command !== c.command) {
      differing.push({
        id,
        why: `command ${b.command} in the baseline, ${c.command} in the candidate`,
      });
    } else if (b.setting !== c.setting) {
      differing.push({ id, why: "its options or inputs differ between the runs" });
    } else if (b.status !== "ok" || c.status !== "ok") {
      differing.push({
        id,
        why: `it did not finish in both runs (baseline ${b.status}, candidate ${c.status})`,
      });
    } else shared.push({ baseline: b, candidate: c });
  }
  const onlyCandidate = [...candidate.steps.keys()].filter((id) => !baseline.steps.has(id));
  return { shared, differing, onlyBaseline, onlyCandidate };
}
