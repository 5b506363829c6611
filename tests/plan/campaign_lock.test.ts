// Issue 27: campaign folders that cannot be written out of, emptied by mistake, or mixed.
// This file: one run at a time in a folder (its lock), and a manifest that never stays
// "running" (a full disk, an error of the run, a signal), and these refusals on the command
// line. The runner runs in this process with stand-in commands that write what a command would.
import { execFileSync, spawn } from "node:child_process";
import { existsSync } from "node:fs";
import { mkdir, mkdtemp, readFile, rm, stat, writeFile } from "node:fs/promises";
import { hostname } from "node:os";
import process from "node:process";
import { beforeEach, describe, expect, test } from "vitest";
import { acquireFolderLock, LOCK_FILE } from "../../lib/plan/folder_lock.ts";
import { mergeShards } from "../../lib/plan/merge.ts";
import type { PlanCommand, RunOptions } from "../../lib/plan/runner.ts";
import { sha256Hex } from "../../lib/io/table_file.ts";
import { runQuiver, SUBPROCESS_TIMEOUT_MS } from "../helpers/cli.ts";
import { base, planIn, refusal, runIn, standIns } from "../helpers/campaign_stand_ins.ts";

let dir = "";
beforeEach(async () => {
  dir = await mkdtemp("/tmp/quiver-camp-");
  await writeFile(`${dir}/road.csv`, "time_s,acc [m/s^2]\n0,0\n0.5,1\n1,0\n");
});

const plan = (content: unknown, name = "plan") => planIn(dir, content, name);
const run = (file: string, more: Partial<RunOptions> = {}) => runIn(dir, file, more);

test("a disk full before the manifest is written: no manifest saying running is left (tmpfs, root)", async (context) => {
  const mount = `${dir}/out`;
  await mkdir(mount);
  try {
    execFileSync("mount", ["-t", "tmpfs", "-o", "size=64k", "tmpfs", mount], { stdio: "ignore" });
  } catch {
    context.skip(); // not root
    return;
  }
  try {
    // The step succeeds, but fills the disk on its way (another writer would do the same).
    const filling: PlanCommand = {
      validate() {},
      async run(argv) {
        await writeFile(argv[argv.indexOf("--out") + 1], "{}");
        try {
          await writeFile(`${mount}/filler.bin`, new Uint8Array(1 << 20));
        } catch {
          // ENOSPC, as meant: the disk is full now
        }
      },
    };
    await expect(run(await plan(base()), { commands: { ...standIns, spectrum: filling } }))
      .rejects.toThrow(/ENOSPC|no space/i);
    const left = existsSync(`${mount}/manifest.json`)
      ? JSON.parse(await readFile(`${mount}/manifest.json`, "utf8")).status
      : "none";
    expect(["aborted", "none"]).toContain(left);
    expect(existsSync(`${mount}/${LOCK_FILE}`)).toBe(false);
  } finally {
    execFileSync("umount", [mount]);
  }
});

describe("one lock per folder", () => {
  test("a whole run, shards of another count, and a merge wait for a campaign's shards", async () => {
    const planFile = await plan(base());
    const sha = sha256Hex(await readFile(planFile));
    await mkdir(`${dir}/out`);
    const shard1 = await acquireFolderLock(`${dir}/out`, {
      kind: "shards",
      planSha256: sha,
      index: 1,
      count: 2,
    });
    // Shard 2 of the same plan joins; shard 1 again, or shards of 3, or a whole run, do not.
    const shard2 = await acquireFolderLock(`${dir}/out`, {
      kind: "shards",
      planSha256: sha,
      index: 2,
      count: 2,
    });
    expect(
      await refusal(
        acquireFolderLock(`${dir}/out`, { kind: "shards", planSha256: sha, index: 1, count: 2 }),
      ),
    ).toMatch(/shard 1 of 2 is already running/);
    expect(
      await refusal(
        acquireFolderLock(`${dir}/out`, { kind: "shards", planSha256: sha, index: 1, count: 3 }),
      ),
    ).toMatch(/a campaign split 2 ways .* is writing this folder; finish it with quiver merge/);
    expect(await refusal(run(planFile))).toMatch(/a campaign split 2 ways/);
    // The merge waits for running shards, then takes the campaign's lock over and lets it go.
    expect(
      await refusal(acquireFolderLock(`${dir}/out`, { kind: "merge", planSha256: sha, count: 2 })),
    ).toMatch(/shard 1 of 2 is still running/);
    await shard1.release();
    await shard2.release();
    expect(existsSync(`${dir}/out/${LOCK_FILE}`)).toBe(true); // the campaign's, until the merge
    const merge = await acquireFolderLock(`${dir}/out`, {
      kind: "merge",
      planSha256: sha,
      count: 2,
    });
    await merge.release(true);
    expect(existsSync(`${dir}/out/${LOCK_FILE}`)).toBe(false);
    expect((await run(planFile)).status).toBe("ok");
  });

  test("a shard run and a whole run of one folder: the second is refused, the first's results stand", async () => {
    const planFile = await plan(base());
    const s = await run(planFile, { shard: { index: 1, count: 1 } });
    expect(s.status).toBe("ok");
    expect(await refusal(run(planFile))).toMatch(/a campaign split 1 ways/);
    const m = await mergeShards(`${dir}/out`, { commands: standIns });
    expect(m.status).toBe("ok");
    expect(existsSync(`${dir}/out/${LOCK_FILE}`)).toBe(false);
  });

  test("a lock file holding null or garbage is a one-line refusal naming it and how to clear it", async () => {
    await mkdir(`${dir}/out`);
    for (const content of ["null", "{not json", '{"pid": "x"}', ""]) {
      await writeFile(`${dir}/out/${LOCK_FILE}`, content);
      const message = await refusal(run(await plan(base())));
      expect(message).toContain(`the lock file ${dir}/out/${LOCK_FILE} is not a quiver lock`);
      expect(message).toContain(`remove ${dir}/out/${LOCK_FILE} and run again`);
      expect(message).not.toContain("\n");
    }
  });
});

describe("the manifest never stays running", () => {
  test("an error of the run itself (the report fails) leaves the manifest aborted, with why", async () => {
    const report = () => Promise.reject(new Error("disk gone"));
    await expect(run(await plan({ ...base(), report: {} }), { report })).rejects.toThrow(
      /disk gone/,
    );
    const m = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    expect(m.status).toBe("aborted");
    expect(m.error).toBe("disk gone");
    expect(m.finished).not.toBeNull();
    expect(existsSync(`${dir}/out/${LOCK_FILE}`)).toBe(false);
  });
});

describe("on the command line: refusals, not internal errors (exit 2, one line)", () => {
  test("a lock holding null, a report called sub/x.html, a recording called toString", async () => {
    await mkdir(`${dir}/out`);
    await writeFile(`${dir}/out/${LOCK_FILE}`, "null");
    const locked = runQuiver(["run", await plan(base()), "--out-dir", `${dir}/out`, "--jobs", "1"]);
    expect(locked.code, locked.stderr).toBe(2);
    expect(locked.stderr.trim().split("\n")).toHaveLength(1);
    expect(locked.stderr).toMatch(/is not a quiver lock/);
    await rm(`${dir}/out/${LOCK_FILE}`);
    const named = runQuiver([
      "run",
      await plan({ ...base(), report: { file: "sub/x.html" } }),
      "--out-dir",
      `${dir}/out`,
    ]);
    expect(named.code, named.stderr).toBe(2);
    expect(named.stderr).toMatch(/report\.file/);
    const p = { ...base(), analyses: [{ id: "a", command: "spectrum", recording: "toString" }] };
    const proto = runQuiver(["run", await plan(p), "--out-dir", `${dir}/out`]);
    expect(proto.code, proto.stderr).toBe(2);
    expect(proto.stderr).toMatch(/no recording "toString"/);
    // A lock of this host's live process (this test) with no kind: an older lock, a whole run.
    await writeFile(
      `${dir}/out/${LOCK_FILE}`,
      JSON.stringify({ pid: process.pid, host: hostname(), started: "2026-12-01T10:00:00Z" }),
    );
    const busy = runQuiver(["run", await plan(base()), "--out-dir", `${dir}/out`]);
    expect(busy.code).toBe(2);
    expect(busy.stderr).toMatch(/another quiver run \(process \d+/);
    expect((await stat(`${dir}/out`)).isDirectory()).toBe(true);
  });
});

describe("a run stopped by a signal", () => {
  test("SIGTERM: the manifest says aborted (not running), and the lock is gone", async () => {
    const planFile = await plan(base());
    const script = new URL("./hanging_run.ts", import.meta.url).pathname;
    const child = spawn(process.execPath, ["run", "-A", script, planFile, `${dir}/out`]);
    const code = await new Promise<number | null>((done, fail) => {
      const timer = setTimeout(() => {
        child.kill("SIGKILL");
        fail(new Error("the step did not start in time"));
      }, SUBPROCESS_TIMEOUT_MS);
      child.stdout.on("data", (chunk) => {
        if (String(chunk).includes("started")) child.kill("SIGTERM");
      });
      child.on("exit", (status) => {
        clearTimeout(timer);
        done(status);
      });
    });
    const m = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    expect(m.status).toBe("aborted");
    expect(m.error).toBe("stopped by SIGTERM");
    expect(existsSync(`${dir}/out/${LOCK_FILE}`)).toBe(false);
    // The exit status is not checked: Deno's child_process reports it as null after a signal.
    void code;
  });
});
