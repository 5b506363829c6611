import { spawn } from "node:child_process";
import { existsSync } from "node:fs";
import { readFile, writeFile } from "node:fs/promises";
import { hostname } from "node:os";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver, SUBPROCESS_TIMEOUT_MS } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));

/**
 * Starts `quiver run` and SIGKILLs it as soon as its second step starts (with --jobs 1
 * the manifest lists the first step by then).
 */
function runAndKillAfterFirstStep(plan: string, outDir: string): Promise<string> {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, [
      "run",
      "-A",
      MAIN,
      "run",
      plan,
      "--out-dir",
      outDir,
      "--jobs",
      "1",
    ], {
      env: { ...process.env, NO_COLOR: "1" },
    });
    let stderr = "";
    const timer = setTimeout(() => {
      child.kill("SIGKILL");
      fail(new Error(`no step ended in time: ${stderr}`));
    }, SUBPROCESS_TIMEOUT_MS);
    child.stderr.on("data", (chunk) => {
      stderr += String(chunk);
      if (/\[2\/\d+\]/.test(stderr)) child.kill("SIGKILL");
    });
    child.on("exit", () => {
      clearTimeout(timer);
      done(stderr);
    });
  });
}

describe("a campaign folder holds one run's results, and says so", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await demoFolder();
  });

  test("a second run on a folder in use is refused with a clear error", async () => {
    // A lock held by a live process on this host: this test's own process.
    const out = `${dir}/busy`;
    await (await import("node:fs/promises")).mkdir(out);
    await writeFile(
      `${out}/.quiver-lock.json`,
      JSON.stringify({ pid: process.pid, host: hostname(), started: "2026-12-01T10:00:00Z" }),
    );
    const r = runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/another quiver run \(process \d+ .*\) is writing this folder/);
    expect(existsSync(`${out}/manifest.json`)).toBe(false);
  });

  test("a killed run leaves a manifest that says so; the next run reports the stale lock and starts clean", async () => {
    const out = `${dir}/killed`;
    // A complete earlier run first, so that old results lie in the folder.
    expect(runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", out]).code).toBe(0);
    await runAndKillAfterFirstStep(`${dir}/tamarack_b2_plan.json`, out);
    const manifest = JSON.parse(await readFile(`${out}/manifest.json`, "utf8"));
    expect(manifest.status).toBe("running");
    expect(manifest.finished).toBeNull();
    expect(manifest.steps.length).toBeGreaterThanOrEqual(1);
    expect(manifest.steps.length).toBeLessThan(7);
    // The earlier run's results were removed when the killed run started: none of them
    // stand beside the killed run's results under a manifest that would vouch for them.
    for (const id of ["bracket_vs_sim", "mount_orders"]) {
      if (!manifest.steps.some((s: { id: string }) => s.id === id)) {
        expect(existsSync(`${out}/${id}.json`), id).toBe(false);
      }
    }
    // The report refuses an unfinished run.
    const report = runQuiver(["report", out]);
    expect(report.code).toBe(1);
    expect(report.stderr).toMatch(/did not finish/);
    // The next run finds the lock of the dead process, says so, and completes.
    const again = runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", out]);
    expect(again.code).toBe(0);
    expect(again.stderr).toMatch(/the lock of a run that was killed .* was found and taken over/);
    expect(JSON.parse(await readFile(`${out}/manifest.json`, "utf8")).status).toBe("ok");
    expect(existsSync(`${out}/.quiver-lock.json`)).toBe(false);
  });

  test("quiver report refuses results that no longer match the manifest", async () => {
    const out = `${dir}/tampered`;
    expect(runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", out]).code).toBe(0);
    expect(runQuiver(["report", out]).code).toBe(0);
    const path = `${out}/cabin_bands.json`;
    const json = JSON.parse(await readFile(path, "utf8"));
    json.metadata.overall[0].level_db -= 10; // a "better" cabin
    await writeFile(path, JSON.stringify(json));
    const r = runQuiver(["report", out]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/cabin_bands\.json is not the file the run wrote/);
  });
});
