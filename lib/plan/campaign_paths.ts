/**
 * Every path a campaign writes or deletes, named and checked in one place.
 *
 * The runner derives each file from a step's id and the output's key
 * (`outputFileName`): nothing a plan says becomes a path it writes. Before
 * any work, `checkCampaignPaths` checks all of them at once, for `run`,
 * `run --shard`, `merge` and `report` alike: each lies inside the output
 * folder (no `..`, no absolute path, no symbolic link leading out, the file
 * itself no link), none is an input of the plan (real paths compared, so a
 * link or `./x` is the same file), no two writers share one, and no input
 * lies under `figures/`, which the report writes. (OWASP, "Path Traversal":
 * a name from input is checked against the folder it must stay in after
 * the path is resolved, links included.)
 *
 * @module
 */
import { lstatSync } from "node:fs";
import { isAbsolute, join, relative, resolve, sep } from "node:path";
import { realPathOf } from "../io/output_paths.ts";
import type { AnalysisDescriptor, StepOptions } from "../analysis_descriptor.ts";

/** The run's manifest, inside the output folder. */
export const MANIFEST_FILE = "manifest.json";
/** The folder of the report's figures, inside the output folder. */
export const FIGURES_FOLDER = "figures";

/**
 * The output keys of a step of the analysis `descriptor` with `options`:
 * `out`, then its side outputs (the `*-out` options of its option table, as
 * its descriptor declares them), each only when its options call for it
 * (`frf`'s multiple-input outputs need two or more inputs).
 *
 * @example
 * ```ts
 * import { outputKeys } from "./campaign_paths.ts";
 * import { ordersDescriptor } from "../orders/orders_descriptor.ts";
 * import { frfDescriptor } from "../frf/frf_descriptor.ts";
 * if (outputKeys(ordersDescriptor, {}).join() !== "out,rpm-out,map-out") throw new Error();
 * if (outputKeys(frfDescriptor, { inputs: ["a", "b"] }).length !== 3) throw new Error();
 * if (outputKeys(frfDescriptor, { inputs: "a" }).length !== 1) throw new Error();
 * ```
 */
export function outputKeys(
  descriptor: AnalysisDescriptor | undefined,
  options: StepOptions,
): string[] {
  const side = Object.entries(descriptor?.outputs ?? {}).filter(([, output]) =>
    output.onlyWith === undefined || output.onlyWith(options)
  );
  return ["out", ...side.map(([key]) => key)];
}

/**
 * What output `key` of the analysis `descriptor` writes: CSV (the hit log,
 * a plain table without a sidecar) or JSON (all others, `out` too).
 *
 * @example
 * ```ts
 * import { outputWrites } from "./campaign_paths.ts";
 * import { hammerDescriptor } from "../frf/hammer_descriptor.ts";
 * if (outputWrites(hammerDescriptor, "hits-out") !== "csv" || outputWrites(hammerDescriptor, "out") !== "json") throw new Error();
 * ```
 */
export function outputWrites(
  descriptor: AnalysisDescriptor | undefined,
  key: string,
): "json" | "csv" {
  const outputs = descriptor?.outputs ?? {};
  return Object.hasOwn(outputs, key) ? outputs[key].writes : "json";
}

/**
 * The file name (inside the output folder) of output `key` of step `id`:
 * `out` → `<id>.json`, `<part>-out` → `<id>_<part>.json`, or `.csv` for an
 * output that `writes` CSV.
 *
 * @throws {RangeError} for a key that is not an output key.
 *
 * @example
 * ```ts
 * import { outputFileName } from "./campaign_paths.ts";
 * if (outputFileName("mo", "rpm-out") !== "mo_rpm.json") throw new Error();
 * if (outputFileName("h", "hits-out", "csv") !== "h_hits.csv") throw new Error();
 * ```
 */
export function outputFileName(id: string, key: string, writes: "json" | "csv" = "json"): string {
  if (key === "out") return `${id}.json`;
  const part = /^([a-z]+)-out$/.exec(key)?.[1];
  if (part === undefined) throw new RangeError(`"${key}" is not an output key`);
  return `${id}_${part}.${writes}`;
}

/**
 * Whether `name` is a report file name the plan may give: one plain file
 * name ending `.html`, in the output folder itself (no folder, no `.`/`..`,
 * no leading dot).
 *
 * @example
 * ```ts
 * import { isReportFileName } from "./campaign_paths.ts";
 * if (!isReportFileName("b2.html") || isReportFileName("sub/x.html") || isReportFileName(".")) throw new Error();
 * ```
 */
export function isReportFileName(name: string): boolean {
  return /^[A-Za-z0-9_][A-Za-z0-9_. -]*\.html$/i.test(name) && !name.includes("..");
}

/**
 * Whether `name` (relative to the output folder) is a figure the report
 * writes: `figures/<plain name>.svg`.
 *
 * @example
 * ```ts
 * import { isFigureName } from "./campaign_paths.ts";
 * if (!isFigureName("figures/psd_spectrum.svg") || isFigureName("figures/../plan.json")) throw new Error();
 * ```
 */
export function isFigureName(name: string): boolean {
  return /^figures\/[A-Za-z0-9_][A-Za-z0-9_.-]*\.svg$/.test(name) && !name.includes("..");
}

/** A file the campaign will write: its path, who writes it, where in the plan that comes from. */
export interface CampaignWrite {
  readonly path: string;
  readonly who: string;
  readonly where: string;
  /**
   * Why the file has its name, when that is not plain from `who`: a side
   * output's name, which another step's id can equal (see {@linkcode sideOutputNote}).
   */
  readonly why?: string;
}

/**
 * Why side output `key` of step `id` is named `file`: `the map side output of step "ru" is
 * named ru_map.json`. Step ids may hold `_`, so a step `ru_map` writes the
 * same `ru_map.json`; a clash names this, so that the user sees which step
 * to rename.
 *
 * @example
 * ```ts
 * import { sideOutputNote } from "./campaign_paths.ts";
 * const why = sideOutputNote("ru", "map-out", "ru_map.json");
 * if (why !== 'the map side output of step "ru" is named ru_map.json (side outputs are named <step id>_<part>)') throw new Error();
 * ```
 */
export function sideOutputNote(id: string, key: string, file: string): string | undefined {
  if (key === "out") return undefined;
  return `the ${
    key.replace(/-out$/, "")
  } side output of step "${id}" is named ${file} (side outputs are named <step id>_<part>)`;
}

/** A file the plan reads, and which key of the plan names it. */
export interface CampaignInput {
  readonly path: string;
  readonly what: string;
}

/**
 * THE check of every path a campaign writes, before any work (`run`,
 * `run --shard`, `merge`, `report`): see the module's rules. Returns the
 * problems as `[where, detail]`, none when all is well; a figure in the
 * report's folder stands for all figures (their names come from step ids).
 *
 * @example
 * ```ts
 * import { checkCampaignPaths } from "./campaign_paths.ts";
 * import { mkdtemp } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const problems = checkCampaignPaths(`${dir}/out`, [
 *   { path: `${dir}/out/a.json`, who: "step a", where: "analyses[0]" },
 *   { path: `${dir}/out/../plan.json`, who: "step b", where: "analyses[1]" },
 * ], [{ path: `${dir}/plan.json`, what: "the plan itself" }]);
 * if (problems.length !== 1 || problems[0][0] !== "analyses[1]") throw new Error();
 * ```
 */
export function checkCampaignPaths(
  outDir: string,
  writes: readonly CampaignWrite[],
  inputs: readonly CampaignInput[],
): [string, string][] {
  const problems: [string, string][] = [];
  const realOut = realPathOf(outDir);
  const absoluteOut = resolve(outDir);
  const inside = (real: string) => real.startsWith(realOut + sep);
  const inputByReal = new Map<string, CampaignInput>();
  for (const input of inputs) {
    inputByReal.set(realPathOf(input.path), input);
    inputByReal.set(realPathOf(`${input.path}.meta.json`), input);
  }
  const figures = realPathOf(join(outDir, FIGURES_FOLDER));
  for (const input of inputs) {
    const real = realPathOf(input.path);
    if (real.startsWith(figures + sep)) {
      problems.push([
        input.what,
        `${input.path} lies in ${
          join(outDir, FIGURES_FOLDER)
        }, which the report writes: keep inputs out of it`,
      ]);
    }
  }
  const written = new Map<string, CampaignWrite>();
  for (const write of writes) {
    const rel = relative(absoluteOut, resolve(write.path));
    if (rel === "" || isAbsolute(rel) || rel.split(/[\\/]/).includes("..")) {
      problems.push([write.where, `${write.path} lies outside the output folder ${outDir}`]);
      continue;
    }
    const real = realPathOf(write.path);
    if (!inside(real)) {
      problems.push([
        write.where,
        `${write.path} leads outside the output folder ${outDir} (through a symbolic link)`,
      ]);
      continue;
    }
    if (isLink(write.path)) {
      problems.push([write.where, `${write.path} is a symbolic link: remove it first`]);
      continue;
    }
    const input = inputByReal.get(real);
    if (input !== undefined) {
      problems.push([input.what, `${write.who} would overwrite this input (${input.path})`]);
      continue;
    }
    const other = written.get(real);
    if (other !== undefined) {
      const why = other.why ?? write.why;
      problems.push([
        write.where,
        `${write.who} would write ${write.path}, which ${other.who} writes too${
          why !== undefined ? `: ${why}; give one of the two steps another id` : ""
        }`,
      ]);
      continue;
    }
    written.set(real, write);
  }
  return problems;
}

/** Whether `path` is itself a symbolic link (a dangling one too). */
function isLink(path: string): boolean {
  try {
    return lstatSync(path).isSymbolicLink();
  } catch {
    return false;
  }
}
