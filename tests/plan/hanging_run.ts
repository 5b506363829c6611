/**
 * A run whose one step never ends, for the signal test in campaign_safety.test.ts:
 * `deno run -A tests/plan/hanging_run.ts PLAN OUT_DIR` prints "started" when the step starts.
 *
 * @module
 */
import process from "node:process";
import { runPlan } from "../../lib/plan/runner.ts";

const [planFile, outDir] = process.argv.slice(2);
await runPlan(planFile, {
  outDir,
  progress: { start() {}, end() {} },
  commands: {
    spectrum: {
      validate() {},
      run: () => {
        process.stdout.write("started\n");
        return new Promise((done) => setTimeout(done, 600_000));
      },
    },
  },
});
