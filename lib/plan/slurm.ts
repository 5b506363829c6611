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

/** Quotes a word for bash. */
function quote(word: string): string {
  return `'${word.replaceAll("'", `'\\''`)}'`;
}

/**
 * The submission script.
 *
 * @throws {RangeError} for fewer than one shard or CPU.
 *
 * @example
 * ```ts
 * import { slurmScript } from "./slurm.ts";
 * const s = slurmScript({ shards: 3, plan: "/p/plan.json", outDir: "/p/out", deno: "/usr/bin/deno", main: "/q/cli/main.ts" });
 * if (!s.includes("--array=1-3") || !s.includes("--shard auto") || !s.includes("afterany:")) throw new Error();
 * ```
 */
export function slurmScript(options: SlurmScriptOptions): string {
  const { shards, plan, outDir, deno, main } = options;
  const cpus = options.cpus ?? 1;
  if (!(Number.isInteger(shards) && shards >= 1)) {
    throw new RangeError(`the number of shards must be a whole number ≥ 1, got ${shards}`);
  }
  if (!(Number.isInteger(cpus) && cpus >= 1)) {
    throw new RangeError(`--cpus must be a whole number ≥ 1, got ${cpus}`);
  }
  const common = [
    ...(options.partition !== undefined ? [`--partition=${quote(options.partition)}`] : []),
    ...(options.time !== undefined ? [`--time=${quote(options.time)}`] : []),
    `--cpus-per-task=${cpus}`,
  ].join(" ");
  const quiver = `${quote(deno)} run -A ${quote(main)}`;
  const runShard = `${quiver} run ${quote(plan)} --shard auto --jobs ${cpus} --out-dir ${
    quote(outDir)
  }`;
  const merge = `${quiver} merge ${quote(outDir)}`;
  return `#!/usr/bin/env bash
# Submits the campaign ${plan} to Slurm as ${shards} shard(s) and a merge.
# Written by quiver run --slurm-script; run it on a login node: bash THIS_FILE
# Results, shard logs and the merged manifest and report go to ${outDir}.
set -euo pipefail
mkdir -p ${quote(outDir)}
shards=$(sbatch --parsable --job-name=quiver-shards --array=1-${shards} ${common} \\
  --output=${quote(`${outDir}/slurm-shard-%a.log`)} \\
  --wrap=${quote(runShard)})
merge=$(sbatch --parsable --job-name=quiver-merge --dependency=afterany:\${shards%%;*} ${common} \\
  --output=${quote(`${outDir}/slurm-merge.log`)} \\
  --wrap=${quote(merge)})
echo "shards: job array \${shards%%;*}, merge: job \${merge%%;*}"
`;
}
