/**
 * Running a plan: validate everything first, then run each analysis and
 * comparison in order with its command, check the targets, write the
 * manifest and (when the plan asks) the report.
 *
 * Validation before any work: the plan's schema (errors name the key path),
 * references between steps, the existence of every input file, and each
 * step's options against its command's own option schema.
 *
 * Fault isolation: a step that fails is recorded in the manifest with its
 * error; steps that need its output are skipped with the reason; the others
 * still run. The manifest's `status` and the caller's exit code say so.
 *
 * @module
 */
import { type FileRecord, type Manifest, manifestSchema } from "./manifest.ts";
export type { FileRecord, Manifest } from "./manifest.ts";
import { acquireFolderLock } from "./folder_lock.ts";
import { assignShards, type Shard, shardLockName, shardManifestName } from "./shards.ts";
import { realPathOf } from "../io/output_paths.ts";
import { createHash } from "node:crypto";
import { existsSync, statSync } from "node:fs";
import { mkdir, open, readFile, rm } from "node:fs/promises";
import { dirname, isAbsolute, join, relative, resolve, sep } from "node:path";
import { QuiverError } from "../errors.ts";
import { sha256Hex } from "../io/table_file.ts";
import { writeFileAtomic } from "../io/atomic_write.ts";
import { QUIVER_VERSION } from "../version.ts";
import { keyPath, optionsToArgv, type Plan, planSchema } from "./schema.ts";
import { createProgress, type Progress } from "./progress.ts";
import { evaluateTargets } from "./target_eval.ts";

/** What the runner needs of a command: a dry check of its arguments, and a run. */
export interface PlanCommand {
  /** Parses and validates `argv` as the command would; throws on bad options. */
  validate(argv: readonly string[]): void;
  /** Runs the command with `argv`. */
  run(argv: readonly string[]): Promise<void>;
}

/** One step as the runner will execute it. */
export interface PlanStep {
  readonly id: string;
  readonly kind: "analysis" | "comparison";
  readonly command: string;
  readonly argv: string[];
  readonly inputs: string[];
  readonly outputs: Record<string, string>;
  readonly needs: string[];
  /** Key path of the step in the plan, for messages. */
  readonly where: string;
}

/** Reads and validates a plan file's JSON against the schema. */
export async function loadPlan(path: string): Promise<{ plan: Plan; text: string }> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch {
    throw new QuiverError("cannot read the plan: no such file", { file: resolve(path) }, "usage");
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    throw new QuiverError(
      `the plan is not valid JSON: ${(error as Error).message}`,
      { file: path },
      "usage",
    );
  }
  const parsed = planSchema.safeParse(json);
  if (!parsed.success) {
    throw planProblems(
      parsed.error.issues.map((issue) => {
        const path_ = keyPath(issue.path);
        const hint = issue.code === "unrecognized_keys" ? ` (${issue.keys.join(", ")})` : "";
        return `plan key ${path_ === "" ? "(top level)" : path_}: ${issue.message}${hint}`;
      }),
      path,
    );
  }
  return { plan: parsed.data, text };
}

/** Thrown inside plan validation to skip the rest of one item once a problem is noted. */
const SKIP = Symbol("skip");

/** One usage error naming every problem of a plan, one per line after the first. */
function planProblems(problems: readonly string[], file: string): QuiverError {
  return new QuiverError(
    problems.length === 1
      ? problems[0]
      : `the plan has ${problems.length} problems:\n  ${problems.join("\n  ")}`,
    { file },
    "usage",
  );
}

/**
 * The steps of a plan with their arguments and output paths, after checking
 * references, input files and every step's options. Throws before any work.
 */
export function planSteps(
  plan: Plan,
  planFile: string,
  outDir: string,
  commands: Readonly<Record<string, PlanCommand>>,
): PlanStep[] {
  // Every problem is collected, so that one run of validation names them all.
  const problems: string[] = [];
  const fail = (where: string, detail: string): never => {
    problems.push(`plan key ${where}: ${detail}`);
    throw SKIP;
  };
  const each = (check: () => void) => {
    try {
      check();
    } catch (error) {
      if (error !== SKIP) throw error;
    }
  };
  const base = dirname(planFile);
  const at = (p: string) => (isAbsolute(p) ? p : join(base, p));
  const steps: PlanStep[] = [];
  const known = new Map<string, string>(); // id → command
  for (const [name, rec] of Object.entries(plan.recordings)) {
    each(() => {
      if (!existsSync(at(rec.file))) fail(`recordings.${name}.file`, `no such file: ${rec.file}`);
    });
    each(() => {
      if (rec.setup !== undefined && !existsSync(at(rec.setup))) {
        fail(`recordings.${name}.setup`, `no such file: ${rec.setup}`);
      }
    });
  }
  const check = (where: string, command: string, argv: string[]) => {
    const c = commands[command];
    if (c === undefined) fail(where, `unknown command "${command}"`);
    try {
      c.validate(argv);
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      const option = /--([a-z0-9-]+)/i.exec(message)?.[1];
      fail(option !== undefined ? `${where}.options.${option}` : `${where}.options`, message);
    }
  };
  plan.analyses.forEach((a, i) =>
    each(() => {
      const where = `analyses[${i}]`;
      if (known.has(a.id)) fail(`${where}.id`, `"${a.id}" is used twice`);
      const argv: string[] = [];
      const inputs: string[] = [];
      const needs: string[] = [];
      if (a.command === "modal") {
        const sources = a.inputs ?? (a.input !== undefined ? [a.input] : []);
        if (sources.length === 0) {
          fail(`${where}.inputs`, "modal needs the ids of frf or hammer analyses");
        }
        sources.forEach((source, k) => {
          const command = known.get(source);
          if (command !== "frf" && command !== "hammer") {
            fail(`${where}.inputs[${k}]`, `"${source}" is not an earlier frf or hammer analysis`);
          }
          const path = join(outDir, `${source}.json`);
          argv.push(path);
          inputs.push(path);
          needs.push(source);
        });
        if (a.geometry !== undefined) {
          const file = at(a.geometry.file);
          if (!existsSync(file)) fail(`${where}.geometry.file`, `no such file: ${a.geometry.file}`);
          argv.push("--geometry", file);
          inputs.push(file);
        }
      } else if (a.command === "mac") {
        if (a.input === undefined || known.get(a.input) !== "modal") {
          fail(`${where}.input`, "mac needs the id of an earlier modal analysis");
        }
        if (a.simulation === undefined) {
          fail(`${where}.simulation.file`, "mac needs the simulation's mode shapes");
        }
        const sim = at((a.simulation as { file: string }).file);
        if (!existsSync(sim)) {
          fail(
            `${where}.simulation.file`,
            `no such file: ${(a.simulation as { file: string }).file}`,
          );
        }
        const shapes = join(outDir, `${a.input}_shapes.json`);
        argv.push(shapes, sim);
        inputs.push(shapes, sim);
        if (a.map !== undefined) {
          const map = at(a.map.file);
          if (!existsSync(map)) fail(`${where}.map.file`, `no such file: ${a.map.file}`);
          argv.push("--map", map);
          inputs.push(map);
        }
        needs.push(a.input as string);
      } else if (a.command === "damping") {
        if (a.input === undefined) {
          fail(`${where}.input`, "damping needs the id of an frf or hammer analysis");
        }
        const source = known.get(a.input as string);
        if (source !== "frf" && source !== "hammer") {
          fail(`${where}.input`, `"${a.input}" is not an earlier frf or hammer analysis`);
        }
        const path = join(outDir, `${a.input}.json`);
        argv.push(path);
        inputs.push(path);
        needs.push(a.input as string);
      } else {
        if (a.command === "paths") {
          const sources = a.inputs ?? [];
          if (sources.length === 0) {
            fail(
              `${where}.inputs`,
              "paths needs the ids of the frf or hammer analyses holding each path's transfer, one per reference",
            );
          }
          const files = sources.map((source, k) => {
            const command = known.get(source);
            if (command !== "frf" && command !== "hammer") {
              fail(`${where}.inputs[${k}]`, `"${source}" is not an earlier frf or hammer analysis`);
            }
            needs.push(source);
            return join(outDir, `${source}.json`);
          });
          if (files.some((f) => f.includes(","))) {
            fail(
              `${where}.inputs`,
              "an output folder whose path holds a comma cannot list transfers",
            );
          }
          argv.push("--transfer", files.join(","));
          inputs.push(...files);
        }
        if (a.recording === undefined) {
          fail(`${where}.recording`, `${a.command} needs a recording`);
        }
        const rec = plan.recordings[a.recording as string];
        if (rec === undefined) {
          fail(`${where}.recording`, `no recording "${a.recording}" in recordings`);
        }
        argv.push(at(rec.file));
        inputs.push(at(rec.file));
        if (rec.setup !== undefined) {
          argv.push("--setup", at(rec.setup));
          inputs.push(at(rec.setup));
        }
        if (rec.rate !== undefined) argv.push("--rate", String(rec.rate));
        // A slice of the recording; an analysis may narrow it with its own start/end options.
        if (rec.start !== undefined && !("start" in a.options)) {
          argv.push("--start", String(rec.start));
        }
        if (rec.end !== undefined && !("end" in a.options)) argv.push("--end", String(rec.end));
      }
      const outputs: Record<string, string> = { out: join(outDir, `${a.id}.json`) };
      if (a.command === "hammer") {
        outputs["hits-out"] = join(outDir, `${a.id}_hits.csv`);
        outputs["records-out"] = join(outDir, `${a.id}_records.json`);
      }
      if (a.command === "modal") {
        for (const part of ["shapes", "stability", "synth"]) {
          outputs[`${part}-out`] = join(outDir, `${a.id}_${part}.json`);
        }
      }
      if (a.command === "mac") outputs["pairs-out"] = join(outDir, `${a.id}_pairs.json`);
      if (a.command === "paths") outputs["bands-out"] = join(outDir, `${a.id}_bands.json`);
      if (a.command === "frf" && severalNames(a.options.inputs)) {
        outputs["partial-out"] = join(outDir, `${a.id}_partial.json`);
        outputs["principal-out"] = join(outDir, `${a.id}_principal.json`);
      }
      if (a.command === "orders") {
        outputs["rpm-out"] = join(outDir, `${a.id}_rpm.json`);
        outputs["map-out"] = join(outDir, `${a.id}_map.json`);
      }
      for (const key of Object.keys(outputs)) {
        if (key in a.options || "format" in a.options) {
          fail(
            `${where}.options.${key in a.options ? key : "format"}`,
            "outputs are set by the plan runner",
          );
        }
      }
      argv.push(...optionsToArgv(a.options));
      for (const [key, path] of Object.entries(outputs)) argv.push(`--${key}`, path);
      check(where, a.command, argv);
      known.set(a.id, a.command);
      steps.push({
        id: a.id,
        kind: "analysis",
        command: a.command,
        argv,
        inputs,
        outputs,
        needs,
        where,
      });
    })
  );
  plan.comparisons.forEach((c, i) =>
    each(() => {
      const where = `comparisons[${i}]`;
      if (known.has(c.id)) fail(`${where}.id`, `"${c.id}" is used twice`);
      if (!known.has(c.test)) fail(`${where}.test`, `no analysis "${c.test}"`);
      const sim = at(c.simulation.file);
      if (!existsSync(sim)) {
        fail(`${where}.simulation.file`, `no such file: ${c.simulation.file}`);
      }
      const test = join(outDir, `${c.test}.json`);
      const outputs = {
        out: join(outDir, `${c.id}.json`),
        "summary-out": join(outDir, `${c.id}_summary.json`),
      };
      const argv = [test, sim, ...optionsToArgv(c.options)];
      if (c.test_column !== undefined) argv.push("--test-column", c.test_column);
      if (c.simulation.column !== undefined) argv.push("--sim-column", c.simulation.column);
      for (const [key, path] of Object.entries(outputs)) argv.push(`--${key}`, path);
      check(where, "compare", argv);
      known.set(c.id, "compare");
      steps.push({
        id: c.id,
        kind: "comparison",
        command: "compare",
        argv,
        inputs: [test, sim],
        outputs,
        needs: [c.test],
        where,
      });
    })
  );
  plan.targets.forEach((t, i) =>
    each(() => {
      if (!known.has(t.of.analysis)) {
        fail(`targets[${i}].of.analysis`, `no analysis "${t.of.analysis}"`);
      }
    })
  );
  each(() => checkPlanOutputs({ plan, planFile, outDir, steps, fail }));
  if (problems.length > 0) throw planProblems(problems, planFile);
  return steps;
}

/** The files a run writes besides the steps' own results. */
export const MANIFEST_FILE = "manifest.json";
const FIGURES_FOLDER = "figures";

/**
 * Every file the plan writes stays inside the output folder, is none of the
 * plan's inputs, and is written by one step only; checked before any work.
 */
function checkPlanOutputs(
  { plan, planFile, outDir, steps, fail }: {
    plan: Plan;
    planFile: string;
    outDir: string;
    steps: readonly PlanStep[];
    fail: (where: string, detail: string) => never;
  },
): void {
  const realOut = realPathOf(outDir);
  const inside = (path: string) => {
    const real = realPathOf(path);
    return real === realOut || real.startsWith(realOut + sep);
  };
  const written = new Map<string, string>(); // real path → who writes it
  const claim = (path: string, who: string, where: string) => {
    if (!inside(path)) fail(where, `${path} lies outside the output folder ${outDir}`);
    const real = realPathOf(path);
    const other = written.get(real);
    if (other !== undefined) fail(where, `${who} would write ${path}, which ${other} writes too`);
    written.set(real, who);
  };
  claim(join(outDir, MANIFEST_FILE), "the manifest", "(output folder)");
  for (const step of steps) {
    for (const [key, path] of Object.entries(step.outputs)) {
      claim(path, `step "${step.id}" (${key})`, `${step.where}.id`);
    }
  }
  if (plan.report !== undefined) {
    const file = plan.report.file;
    if (isAbsolute(file) || file.split(/[\\/]/).includes("..") || file === "") {
      fail("report.file", `"${file}" must be a file name inside the output folder, without ".."`);
    }
    if (file.split(/[\\/]/)[0] === FIGURES_FOLDER) {
      fail("report.file", `the ${FIGURES_FOLDER}/ folder holds the report's figures`);
    }
    claim(join(outDir, file), "the report", "report.file");
    // The report's figures go into figures/: a link there must not lead out either.
    const figure = join(outDir, FIGURES_FOLDER, "figure.svg");
    if (!inside(figure)) {
      fail("report", `${join(outDir, FIGURES_FOLDER)} leads outside the output folder ${outDir}`);
    }
  }
  const base = dirname(planFile);
  const at = (p: string) => (isAbsolute(p) ? p : join(base, p));
  const inputs: [string, string][] = [[planFile, "the plan itself"]];
  for (const [name, rec] of Object.entries(plan.recordings)) {
    inputs.push([at(rec.file), `recordings.${name}.file`]);
    if (rec.setup !== undefined) inputs.push([at(rec.setup), `recordings.${name}.setup`]);
  }
  plan.comparisons.forEach((c, i) => {
    inputs.push([at(c.simulation.file), `comparisons[${i}].simulation.file`]);
  });
  plan.analyses.forEach((a, i) => {
    if (a.simulation !== undefined) {
      inputs.push([at(a.simulation.file), `analyses[${i}].simulation.file`]);
    }
    if (a.geometry !== undefined) {
      inputs.push([at(a.geometry.file), `analyses[${i}].geometry.file`]);
    }
    if (a.map !== undefined) inputs.push([at(a.map.file), `analyses[${i}].map.file`]);
  });
  for (const [path, what] of inputs) {
    for (const file of [path, `${path}.meta.json`]) {
      const writer = written.get(realPathOf(file));
      if (writer !== undefined) fail(what, `${writer} would overwrite this input (${path})`);
    }
  }
}

// Hashes by path, size and modification time: a recording used by several
// steps of a run is hashed once.
const hashCache = new Map<string, string>();

/**
 * A file's record for a manifest: path relative to the output folder (when
 * inside it), size and SHA-256.
 */
export async function record(path: string, outDir: string): Promise<FileRecord> {
  const stat = statSync(path);
  const key = `${path}\u0000${stat.size}\u0000${stat.mtimeMs}`;
  let sha256 = hashCache.get(key);
  if (sha256 === undefined) {
    const hash = createHash("sha256");
    const handle = await open(path, "r");
    try {
      const buffer = new Uint8Array(1 << 22);
      for (;;) {
        const { bytesRead } = await handle.read(buffer, 0, buffer.length, null);
        if (bytesRead === 0) break;
        hash.update(buffer.subarray(0, bytesRead));
      }
    } finally {
      await handle.close();
    }
    sha256 = hash.digest("hex");
    hashCache.set(key, sha256);
  }
  return { path: relative(outDir, path) || path, bytes: stat.size, sha256 };
}

/** Options of {@linkcode runPlan}. */
export interface RunOptions {
  /** Output folder. Required. */
  outDir: string;
  /** The commands by name. Required. */
  commands: Readonly<Record<string, PlanCommand>>;
  /** Progress reporter. Default: stderr. */
  progress?: Progress;
  /** Writes the report; called when the plan has a `report` section. */
  report?: (outDir: string, manifest: Manifest, plan: Plan) => Promise<string>;
  /** Steps run at once, each as soon as the steps it needs are done. Default 1. */
  jobs?: number;
  /** Unmet targets make the run exit with its own code, whatever the plan says. Default false. */
  requireTargets?: boolean;
  /** Runs one step; default: the command's `run` in this process (a pool passes its own). */
  execute?: (command: string, argv: readonly string[], stepId: string) => Promise<void>;
  /**
   * Run only this shard's steps (shards.ts), writing a partial manifest
   * `manifest.shard-K-of-N.json` and no targets or report (the merge does).
   * Default: the whole plan.
   */
  shard?: Shard;
}

/**
 * Runs a plan file and returns its manifest (also written as
 * `<outDir>/manifest.json`).
 *
 * @throws {QuiverError} (usage) for a plan that fails validation; step
 * failures are recorded in the manifest instead.
 *
 * @example
 * ```ts
 * import { runPlan } from "./runner.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/run.csv`, "time_s,mic [Pa]\n0,0\n0.5,1\n1,0\n");
 * await writeFile(`${dir}/plan.json`, JSON.stringify({ quiver_plan: 1, title: "doc",
 *   recordings: { r: { file: "run.csv" } }, analyses: [{ id: "s", command: "spectrum", recording: "r", options: {} }],
 *   report: { title: "doc" } }));
 * // A stand-in command writing a two-line spectrum; quiver's own commands come from cli/commands.ts.
 * const spectrum = { validate() {}, async run(argv: readonly string[]) {
 *   await writeFile(argv[argv.indexOf("--out") + 1], JSON.stringify({
 *     metadata: { analysis: "spectrum", kind: "rms", df_hz: 1, averages: 1, window: "hann" },
 *     columns: [{ name: "frequency_hz", unit: "", values: [0, 1] }, { name: "mic", unit: "Pa", values: [0, 0.5] }] }));
 * } };
 * const manifest = await runPlan(`${dir}/plan.json`, { outDir: `${dir}/out`, commands: { spectrum }, progress: { start() {}, end() {} } });
 * if (manifest.status !== "ok" || manifest.steps[0].outputs.out.sha256.length !== 64) throw new Error();
 * ```
 */
export async function runPlan(planFile: string, options: RunOptions): Promise<Manifest> {
  const started = new Date().toISOString();
  const { plan, text } = await loadPlan(planFile);
  const outDir = resolve(options.outDir);
  const all = planSteps(plan, resolve(planFile), outDir, options.commands);
  const shard = options.shard;
  // A shard runs its own steps only; the whole plan was validated above all the same.
  const shardOf = shard !== undefined ? assignShards(all, shard.count) : undefined;
  const steps = shardOf === undefined ? all : all.filter((_, i) => shardOf[i] === shard!.index);
  const manifestFile = shard !== undefined ? shardManifestName(shard) : MANIFEST_FILE;
  await mkdir(outDir, { recursive: true });
  const lock = await acquireFolderLock(
    outDir,
    shard !== undefined ? shardLockName(shard) : undefined,
  );
  try {
    if (lock.stale !== undefined) {
      process.stderr.write(
        `run: the lock of a run that was killed (process ${lock.stale.pid}, started ${lock.stale.started}) was found and taken over\n`,
      );
    }
    const removed = await removePreviousRun(outDir, manifestFile);
    if (removed > 0) {
      process.stderr.write(`run: removed ${removed} result file(s) of the previous run here\n`);
    }
    return await runLocked({ plan, text, planFile, outDir, steps, started, options, manifestFile });
  } finally {
    await lock.release();
  }
}

/**
 * Removes what the previous run's manifest lists (results, report, figures)
 * and the manifest itself, so that the folder never holds results of two
 * runs side by side. Files no manifest lists are left alone. Returns the
 * number of files removed.
 */
async function removePreviousRun(outDir: string, manifestFile: string): Promise<number> {
  let previous: unknown;
  try {
    previous = JSON.parse(await readFile(join(outDir, manifestFile), "utf8"));
  } catch {
    return 0;
  }
  const parsed = manifestSchema.safeParse(previous);
  if (!parsed.success) return 0; // not ours to interpret: left as it is
  const realOut = realPathOf(outDir);
  const files = parsed.data.steps.flatMap((step) =>
    Object.values(step.outputs).flatMap((o) => [o.path, `${o.path}.meta.json`])
  );
  if (parsed.data.report !== undefined) files.push(parsed.data.report);
  let removed = 0;
  for (const file of files) {
    const path = resolve(outDir, file);
    const real = realPathOf(path);
    if (!real.startsWith(realOut + sep) || !existsSync(path)) continue;
    await rm(path, { force: true });
    removed++;
  }
  // A shard removes its own results only: the figures and the merged manifest are the merge's.
  if (manifestFile === MANIFEST_FILE) {
    await rm(join(outDir, FIGURES_FOLDER), { recursive: true, force: true });
  }
  await rm(join(outDir, manifestFile), { force: true });
  return removed;
}

async function runLocked(
  { plan, text, planFile, outDir, steps, started, options, manifestFile }: {
    plan: Plan;
    text: string;
    planFile: string;
    outDir: string;
    steps: readonly PlanStep[];
    started: string;
    options: RunOptions;
    manifestFile: string;
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
    writing = writing.then(() =>
      writeFileAtomic(join(outDir, manifestFile), JSON.stringify(manifest, null, 2) + "\n")
    );
    return writing;
  };
  const progressManifest = (): Manifest => ({
    ...header,
    finished: null,
    status: "running",
    steps: results.filter((r) => r !== undefined),
    targets: [],
  });
  const results: Manifest["steps"][number][] = new Array(steps.length);
  await writeManifest(progressManifest());
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
    try {
      await execute(step.command, step.argv, step.id);
      const outputs: Record<string, FileRecord> = {};
      for (const [key, path] of Object.entries(step.outputs)) {
        if (existsSync(path) && statSync(path).isFile()) outputs[key] = await record(path, outDir);
      }
      const seconds = (performance.now() - begin) / 1000;
      progress.end(i + 1, label, true, seconds);
      results[i] = { ...base, outputs, status: "ok", seconds };
    } catch (error) {
      failed.add(step.id);
      const message = error instanceof Error ? error.message : String(error);
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
  const targets = options.shard === undefined ? await evaluateTargets(plan, outDir, failed) : [];
  let manifest: Manifest = {
    ...header,
    finished: new Date().toISOString(),
    status: results.some((r) => r.status !== "ok") ? "failed" : "ok",
    steps: results,
    targets,
  };
  if (plan.report !== undefined && options.report !== undefined && options.shard === undefined) {
    const reportPath = await options.report(outDir, manifest, plan);
    manifest = { ...manifest, report: relative(outDir, reportPath) };
  }
  await writeManifest(manifest);
  return manifest;
}

/** Whether an `inputs` option names two or more channels (a list, or "a,b" text). */
function severalNames(value: unknown): boolean {
  if (Array.isArray(value)) return value.length > 1;
  return typeof value === "string" && value.split(",").length > 1;
}
