import { readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

// The demo campaign has one failing target on purpose (an invented cabin limit curve),
// so it serves to check the exit codes (common practice: CI gates on an exit code).
describe("targets and the exit code", () => {
  let dir: string;
  let plan: Record<string, unknown>;
  beforeAll(async () => {
    dir = await demoFolder();
    plan = JSON.parse(await readFile(`${dir}/tamarack_b2_plan.json`, "utf8"));
  });

  test("by default a failed target is reported and the run exits 0", () => {
    const r = runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", `${dir}/a`]);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/targets 11\/13 passed/);
  });

  test("--require-targets makes it exit 4, naming the target", async () => {
    const r = runQuiver([
      "run",
      `${dir}/tamarack_b2_plan.json`,
      "--out-dir",
      `${dir}/b`,
      "--require-targets",
    ]);
    expect(r.code).toBe(4);
    expect(r.stderr).toMatch(/target cabin_thirds: FAIL/);
    expect(r.stderr).toMatch(/target whine_tnr: FAIL/);
    const manifest = JSON.parse(await readFile(`${dir}/b/manifest.json`, "utf8"));
    expect(manifest.require_targets).toBe(true);
  });

  test('the plan key "require_targets": true does the same', async () => {
    await writeFile(`${dir}/strict.json`, JSON.stringify({ ...plan, require_targets: true }));
    const r = runQuiver(["run", `${dir}/strict.json`, "--out-dir", `${dir}/c`]);
    expect(r.code).toBe(4);
  });
});
