/**
 * A bash script that submits a sharded campaign to Slurm: the shards as one
 * job array, the merge as a job that waits for the whole array
 * (`--dependency=afterany`, so the merge runs, and names a failed shard,
 * even when one fails). Paths are absolute: the folder must be on a file
 * system every node sees.
 *
 * @module
 */

/** Options of {@linkcode slurmScript}. */
export interface SlurmScriptOptions {
  /** Number of shards (array tasks), at least 1. Required. */
  shards: number;
  /** Absolute path of the plan. Required. */
  plan: string;
  /** Absolute path of the output folder. Required. */
  outDir: string;
  /** The deno executable. Required. */
  deno: string;
  /** Absolute path of quiver's cli/main.ts. Required. */
  main: string;
  /** Slurm partition. Default: the cluster's default. */
  partition?: string;
  /** Time limit per job, Slurm's format. Default: the partition's. */
  time?: string;
  /** CPUs per shard (also the shard's --jobs). Default 1. */
  cpus?: number;
}

/** Quotes a word for bash: single quotes, each `'` closed, escaped and reopened. */
function quote(word: string): string {
  return `'${word.replaceAll("'", `'\\''`)}'`;
}

/**
 * Slurm reads `%` in `--output` as a pattern (`%a` the array index); `%%`
 * is a literal one (sbatch(1), "filename pattern").
 */
function literalPattern(path: string): string {
  return path.replaceAll("%", "%%");
}

/** C0 and C1 control characters and DEL: a newline in a path would end a comment or a command. */
// deno-lint-ignore no-control-regex
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;

/**
 * Refuses a value that no quoting can make safe to show in a script:
 * quoting covers the shell, but a control character would still end the
 * comment line the value is shown on (OWASP, OS Command Injection Defense
 * Cheat Sheet: reject what cannot be escaped).
 */
function checked(what: string, value: string): string {
  const bad = CONTROL.exec(value);
  if (bad !== null) {
    throw new RangeError(
      `${what} holds a control character (U+${
        bad[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, "0")
      }) and cannot be put into a shell script: ${JSON.stringify(value)}`,
    );
  }
  return value;
}

/**
 * The submission script.
 *
 * Every path and Slurm value is single-quoted for bash; one holding a
 * control character (a newline would end the comment it is shown on) is
 * refused.
 *
 * @throws {RangeError} for fewer than one shard or CPU, or a value with a control character.
 *
 * @example
 * ```ts
 * import { slurmScript } from "./slurm.ts";
 * const s = slurmScript({ shards: 3, plan: "/p/plan.json", outDir: "/p/out", deno: "/usr/bin/deno", main: "/q/cli/main.ts" });
 * if (!s.includes("--array=1-3") || !s.includes("--shard auto") || !s.includes("afterany:")) throw new Error();
 * ```
 */
export function slurmScript(options: SlurmScriptOptions): string {
  const { shards } = options;
  const plan = checked("the plan path", options.plan);
  const outDir = checked("the output folder", options.outDir);
  const deno = checked("the deno path", options.deno);
  const main = checked("quiver's main.ts path", options.main);
  const cpus = options.cpus ?? 1;
  if (!(Number.isInteger(shards) && shards >= 1)) {
    throw new RangeError(`the number of shards must be a whole number ≥ 1, got ${shards}`);
  }
  if (!(Number.isInteger(cpus) && cpus >= 1)) {
    throw new RangeError(`--cpus must be a whole number ≥ 1, got ${cpus}`);
  }
  const common = [
    ...(options.partition !== undefined
      ? [`--partition=${quote(checked("--partition", options.partition))}`]
      : []),
    ...(options.time !== undefined ? [`--time=${quote(checked("--time", options.time))}`] : []),
    `--cpus-per-task=${cpus}`,
  ].join(" ");
  const quiver = `${quote(deno)} run -A ${quote(main)}`;
  const runShard = `${quiver} run ${quote(plan)} --shard auto --jobs ${cpus} --out-dir ${
    quote(outDir)
  }`;
  const merge = `${quiver} merge ${quote(outDir)}`;
  return `#!/usr/bin/env bash
# Submits the campaign ${quote(plan)} to Slurm as ${shards} shard(s) and a merge.
# Written by quiver run --slurm-script; run it on a login node: bash THIS_FILE
# Results, shard logs and the merged manifest and report go to ${quote(outDir)}.
set -euo pipefail
mkdir -p ${quote(outDir)}
shards=$(sbatch --parsable --job-name=quiver-shards --array=1-${shards} ${common} \\
  --output=${quote(`${literalPattern(outDir)}/slurm-shard-%a.log`)} \\
  --wrap=${quote(runShard)})
merge=$(sbatch --parsable --job-name=quiver-merge --dependency=afterany:\${shards%%;*} ${common} \\
  --output=${quote(`${literalPattern(outDir)}/slurm-merge.log`)} \\
  --wrap=${quote(merge)})
echo "shards: job array \${shards%%;*}, merge: job \${merge%%;*}"
`;
}
