import { describe, expect, test } from "vitest";
import { WorkerPool } from "../../cli/worker_pool.ts";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

describe("the worker pool of run --jobs", () => {
  test("starts workers only as steps need them: one step, one worker, even with 64 allowed", async () => {
    const pool = new WorkerPool(64);
    expect(pool.started).toBe(0);
    // A command that fails at once (no input file) still needs a worker to run on.
    await expect(pool.run("spectrum", ["/nonexistent/quiver.csv"], "s: ")).rejects.toThrow();
    expect(pool.started).toBe(1);
    await expect(pool.run("spectrum", ["/nonexistent/quiver.csv"], "s: ")).rejects.toThrow();
    expect(pool.started).toBe(1); // the idle worker is reused
    pool.close();
  });

  test("every line a step writes carries its id", async () => {
    const dir = await demoFolder();
    const r = runQuiver([
      "run",
      `${dir}/tamarack_b2_plan.json`,
      "--out-dir",
      `${dir}/out`,
      "--jobs",
      "2",
    ]);
    expect(r.code, r.stderr).toBe(0);
    // The hammer step's summary line, written from its worker, is labelled with the step.
    expect(r.stderr).toMatch(/^bracket_frf: \d+ hits: /m);
    // No unlabelled line from a command: each is a progress line, the run's own, or labelled.
    for (const line of r.stderr.trim().split("\n")) {
      expect(line, line).toMatch(/^(\[\d+\/\d+\]|run: |  |[A-Za-z0-9_-]+: )/);
    }
  });
});
