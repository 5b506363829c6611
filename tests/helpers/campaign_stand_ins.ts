/**
 * The stand-in commands and plan helpers of the campaign-safety tests: the
 * runner runs in the test's process with commands that write what a command
 * would, so that what is tested is the runner's own rule.
 */
import { writeFile } from "node:fs/promises";
import { expect } from "vitest";
import {
  type Manifest,
  type PlanCommand,
  type RunOptions,
  runPlan,
} from "../../lib/plan/runner.ts";

/** A progress reporter that says nothing. */
export const quiet = { start() {}, end() {} };

/** A stand-in command: writes every `--*-out`/`--out` it is given (a small JSON each). */
export function writer(
  fail?: (argv: readonly string[], written: string[]) => Promise<void>,
): PlanCommand {
  return {
    validate() {},
    async run(argv) {
      const written: string[] = [];
      for (let i = 0; i < argv.length; i++) {
        if (/^--(out|[a-z]+-out)$/.test(argv[i])) {
          await writeFile(argv[i + 1], JSON.stringify({ from: argv[0] }));
          written.push(argv[i + 1]);
          if (fail !== undefined) await fail(argv, written);
        }
      }
    },
  };
}

/** The stand-ins of the commands the tests' plans use. */
export const standIns: Record<string, PlanCommand> = {
  spectrum: writer(),
  compare: writer(),
  hammer: writer(),
  orders: writer(),
};

/** A plan of one spectrum of the recording road.csv. */
export const base = () => ({
  quiver_plan: 1,
  title: "t",
  recordings: { road: { file: "road.csv" } },
  analyses: [{ id: "psd", command: "spectrum", recording: "road", options: {} }] as Record<
    string,
    unknown
  >[],
});

/** Writes a plan into `dir` and returns its path. */
export async function planIn(dir: string, content: unknown, name = "plan"): Promise<string> {
  await writeFile(`${dir}/${name}.json`, JSON.stringify(content));
  return `${dir}/${name}.json`;
}

/** Runs a plan into `<dir>/out` with the stand-ins. */
export function runIn(
  dir: string,
  file: string,
  more: Partial<RunOptions> = {},
): Promise<Manifest> {
  return runPlan(file, { outDir: `${dir}/out`, commands: standIns, progress: quiet, ...more });
}

/** The one-line usage refusal a promise rejects with. */
export async function refusal(promise: Promise<unknown>): Promise<string> {
  let error: unknown;
  try {
    await promise;
  } catch (e) {
    error = e;
  }
  expect(error, "refused").toBeInstanceOf(Error);
  expect((error as { kind?: string }).kind).toBe("usage");
  return (error as Error).message;
}
