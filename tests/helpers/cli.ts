/** Runs the quiver command line in a child process, as a user would. */
import { spawnSync } from "node:child_process";
import process from "node:process";
import { fileURLToPath } from "node:url";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));

/** How long one quiver subprocess may take before the test calls it hung. */
export const SUBPROCESS_TIMEOUT_MS = 180_000;

/** What a run printed and returned. */
export interface CliResult {
  code: number;
  stdout: string;
  stderr: string;
}

/** Runs `deno run -A cli/main.ts ...args` (the deno running the tests). */
export function runQuiver(args: readonly string[], cwd?: string): CliResult {
  const result = spawnSync(process.execPath, ["run", "-A", MAIN, ...args], {
    cwd,
    encoding: "utf8",
    env: { ...process.env, NO_COLOR: "1" },
    // A limit for a hang, far above any run on a loaded machine: no test depends on speed.
    timeout: SUBPROCESS_TIMEOUT_MS,
    maxBuffer: 256 * 1024 * 1024,
  });
  if (result.error !== undefined) throw result.error;
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}
