/** Runs the quiver command line in a child process, as a user would. */
import { spawnSync } from "node:child_process";
import process from "node:process";
import { fileURLToPath } from "node:url";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));

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
  });
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}
