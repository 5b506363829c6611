/**
 * Running a checked plan's steps in its locked output folder: each step as
 * soon as what it needs is done (up to `jobs` at once), its outputs
 * recorded, a failed step's partial outputs removed and the steps after it
 * skipped; then the targets and the report. The manifest says `running`
 * from the start, lists each step as it ends, and says `aborted` (and why)
 * when the run ends early, a caught signal too.
 *
 * @module
 */
import { existsSync, statSync } from "node:fs";
import { rm } from "node:fs/promises";
import process from "node:process";
import { join, relative, resolve } from "node:path";
import { sha256Hex } from "../io/table_file.ts";
import { writeFileAtomic } from "../io/atomic_write.ts";
import { QUIVER_VERSION } from "../version.ts";
import type { FileRecord, Manifest } from "./manifest.ts";
import type { Plan } from "./schema.ts";
import type { PlanStep } from "./plan_steps.ts";
import { createProgress } from "./progress.ts";
import { evaluateTargets } from "./target_eval.ts";
import { fileStamp, record } from "./file_record.ts";
import { writeRecordedReport } from "./report_files.ts";
import type { RunOptions } from "./runner.ts";

/**
 * The signals a run catches to leave its manifest `aborted` rather than
 * `running` (SIGKILL cannot be caught: the next run finds its lock).
 */
const CAUGHT_SIGNALS = ["SIGINT", "SIGTERM", "SIGHUP"] as const;

export async function runLocked(
  { plan, text, planFile, outDir, steps, started, options, manifestFile, release }: {
    plan: Plan;
    text: string;
    planFile: string;
    outDir: string;
    steps: readonly PlanStep[];
    started: string;
    options: RunOptions;
    manifestFile: string;
    /** Lets the folder's lock go (a signal ends the process before any finally runs). */
    release: () => Promise<void>;
  },
): Promise<Manifest> {
  const planBytes = new TextEncoder().encode(text);
  const header = {
    quiver_version: QUIVER_VERSION,
    plan: {
      path: resolve(planFile),
      bytes: planBytes.length,
      sha256: sha256Hex(planBytes),
      title: plan.title,
    },
    out_dir: outDir,
    started,
    require_targets: plan.require_targets || options.requireTargets === true,
    ...(options.shard !== undefined ? { shard: options.shard } : {}),
  };
  // The manifest says "running" from the start and lists each step as it ends, so a
  // killed run leaves a manifest that says it did not finish and what it did.
  let writing = Promise.resolve();
  const writeManifest = (manifest: Manifest) => {
    writing = writing.catch(() => {}).then(() =>
      writeFileAtomic(join(outDir, manifestFile), JSON.stringify(manifest, null, 2) + "\n")
    );
    return writing;
  };
  const results: Manifest["steps"][number][] = new Array(steps.length);
  const listed = () => results.filter((r) => r !== undefined);
  const progressManifest = (): Manifest => ({
    ...header,
    finished: null,
    status: "running",
    steps: listed(),
    targets: [],
  });
  // Whatever ends the run early (an error of ours, a full disk, a signal), the manifest
  // then says "aborted" and why, never "running".
  let ended = false;
  const abort = async (reason: string) => {
    if (ended) return;
    ended = true;
    await writeManifest({
      ...header,
      finished: new Date().toISOString(),
      status: "aborted",
      error: reason,
      steps: listed(),
      targets: [],
    }).catch(async () => {
      // Not even that could be written (a full disk): no manifest rather than one saying "running".
      await rm(join(outDir, manifestFile), { force: true }).catch(() => {});
    });
  };
  const onSignal = (signal: string, code: number) => () => {
    process.stderr.write(`run: stopped by ${signal}; the manifest says aborted\n`);
    void abort(`stopped by ${signal}`).then(release).finally(() => process.exit(code));
  };
  const handlers = CAUGHT_SIGNALS.map((signal, k) => {
    const handler = onSignal(signal, [130, 143, 129][k]);
    try {
      process.on(signal, handler);
    } catch {
      return () => {}; // a signal this system does not have (SIGHUP on Windows)
    }
    return () => process.off(signal, handler);
  });
  try {
    await writeManifest(progressManifest());
    const manifest = await runSteps();
    ended = true;
    return manifest;
  } catch (error) {
    await abort(error instanceof Error ? error.message : String(error));
    throw error;
  } finally {
    for (const off of handlers) off();
  }

  async function runSteps(): Promise<Manifest> {
    const progress = options.progress ?? createProgress(steps.length);
    const failed = new Set<string>();
    const done = new Set<string>();
    const execute = options.execute ??
      ((command: string, argv: readonly string[]) => options.commands[command].run(argv));
    const runStep = async (i: number): Promise<void> => {
      const step = steps[i];
      const label = `${step.command} ${step.id}`;
      const begin = performance.now();
      progress.start(i + 1, label);
      const blocked = step.needs.find((n) => failed.has(n));
      const inputs = await Promise.all(
        step.inputs.filter((p) => existsSync(p)).map((p) => record(p, outDir)),
      );
      const base = { id: step.id, kind: step.kind, command: step.command, argv: step.argv, inputs };
      if (blocked !== undefined) {
        failed.add(step.id);
        progress.end(i + 1, label, false, 0, `skipped: "${blocked}" failed`);
        results[i] = {
          ...base,
          outputs: {},
          status: "skipped",
          error: `needs "${blocked}", which failed`,
          seconds: 0,
        };
        return;
      }
      // What lies at each output path now: after a failure, a file that changed was the step's.
      const stamps = Object.values(step.outputs).map((path) => [path, fileStamp(path)] as const);
      try {
        await execute(step.command, step.argv, step.id);
        const outputs: Record<string, FileRecord> = {};
        for (const [key, path] of Object.entries(step.outputs)) {
          if (existsSync(path) && statSync(path).isFile()) {
            outputs[key] = await record(path, outDir);
          }
        }
        const seconds = (performance.now() - begin) / 1000;
        progress.end(i + 1, label, true, seconds);
        results[i] = { ...base, outputs, status: "ok", seconds };
      } catch (error) {
        failed.add(step.id);
        let message = error instanceof Error ? error.message : String(error);
        // A step that fails half-way (a full disk) leaves none of its outputs behind.
        const partial: string[] = [];
        for (const [path, stamp] of stamps) {
          const now = fileStamp(path);
          if (now !== "" && now !== stamp) {
            await rm(path, { force: true });
            partial.push(relative(outDir, path));
          }
        }
        if (partial.length > 0) message += ` (its partial outputs removed: ${partial.join(", ")})`;
        const seconds = (performance.now() - begin) / 1000;
        progress.end(i + 1, label, false, seconds, message);
        results[i] = { ...base, outputs: {}, status: "failed", error: message, seconds };
      }
    };
    // Steps start in plan order as soon as what they need is done, up to `jobs` at once.
    const jobs = Math.max(1, options.jobs ?? 1);
    const running = new Map<number, Promise<number>>();
    const waiting = steps.map((_, i) => i);
    while (waiting.length > 0 || running.size > 0) {
      for (let w = 0; w < waiting.length && running.size < jobs;) {
        const i = waiting[w];
        if (steps[i].needs.every((n) => done.has(n))) {
          waiting.splice(w, 1);
          running.set(i, runStep(i).then(() => i));
        } else {
          w++;
        }
      }
      if (running.size === 0) break; // cannot happen: needs always name earlier steps
      const finished = await Promise.race(running.values());
      running.delete(finished);
      done.add(steps[finished].id);
      await writeManifest(progressManifest());
    }
    // A shard's targets wait for the merge: they may read any shard's results.
    const targets = options.shard === undefined
      ? await evaluateTargets(plan, outDir, failed, options.table)
      : [];
    let manifest: Manifest = {
      ...header,
      finished: new Date().toISOString(),
      status: results.some((r) => r.status !== "ok") ? "failed" : "ok",
      steps: results,
      targets,
    };
    const report = options.report;
    if (plan.report !== undefined && report !== undefined && options.shard === undefined) {
      const written = await writeRecordedReport(outDir, () => report(outDir, manifest, plan));
      manifest = { ...manifest, report: written.report, report_files: written.files };
    }
    await writeManifest(manifest);
    return manifest;
  }
}
