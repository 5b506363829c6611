/**
 * The demo campaign submitted to a real Slurm: a single-node cluster
 * (munged, slurmctld, slurmd with a minimal configuration in a temporary
 * folder) started by this test and stopped by it, by the PIDs it started.
 * .ci/run installs Debian's slurm-wlm and munge; skipping needs an explicit
 * QUIVER_SKIP_SLURM=1, and the test then shows as skipped, not passed.
 */
import { type ChildProcess, spawn, spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { chmod, mkdir, mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { hostname } from "node:os";
import process from "node:process";
import { randomBytes } from "node:crypto";
import { afterAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

const DAEMONS = ["/usr/sbin/munged", "/usr/sbin/slurmctld", "/usr/sbin/slurmd"];
const installed = DAEMONS.every((d) => existsSync(d)) && existsSync("/usr/bin/sbatch");
const skip = !installed && process.env.QUIVER_SKIP_SLURM === "1";

/** Bounded waits: far above what a loaded 2-core machine needs, only a hang reaches them. */
const CLUSTER_UP_MS = 120_000;
const CAMPAIGN_MS = 900_000;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until(what: string, limitMs: number, check: () => Promise<boolean> | boolean) {
  const end = Date.now() + limitMs;
  while (Date.now() < end) {
    if (await check()) return;
    await sleep(1000);
  }
  throw new Error(`timed out after ${limitMs / 1000} s waiting for ${what}`);
}

describe.skipIf(skip)("a sharded campaign on a single-node Slurm cluster", () => {
  const started: ChildProcess[] = [];
  let folder = "";
  afterAll(async () => {
    // Stop what this test started, by PID, newest first; nothing else.
    for (const child of started.reverse()) {
      if (child.pid !== undefined && child.exitCode === null) {
        child.kill("SIGTERM");
        await Promise.race([new Promise((r) => child.once("exit", r)), sleep(15_000)]);
        if (child.exitCode === null && child.signalCode === null) child.kill("SIGKILL");
      }
    }
    if (folder !== "") await rm(folder, { recursive: true, force: true });
  });

  test("three shards as a job array and a dependent merge equal a single-machine run", async () => {
    expect(installed, "slurm-wlm and munge are needed (apt-get install -y slurm-wlm munge)").toBe(
      true,
    );
    folder = await mkdtemp("/tmp/quiver-slurm-");
    for (const sub of ["state", "spool", "log"]) await mkdir(`${folder}/${sub}`);
    await writeFile(`${folder}/munge.key`, randomBytes(1024));
    await chmod(`${folder}/munge.key`, 0o400);
    const host = hostname().split(".")[0];
    const port = 20000 + Math.floor(Math.random() * 20000);
    const conf = `${folder}/slurm.conf`;
    await writeFile(
      conf,
      [
        "ClusterName=quivertest",
        `SlurmctldHost=${host}(127.0.0.1)`,
        `SlurmctldPort=${port}`,
        `SlurmdPort=${port + 1}`,
        "SlurmUser=root",
        "SlurmdUser=root",
        "AuthType=auth/munge",
        "CredType=cred/munge",
        `AuthInfo=socket=${folder}/munge.sock`,
        `StateSaveLocation=${folder}/state`,
        `SlurmdSpoolDir=${folder}/spool`,
        `SlurmctldPidFile=${folder}/slurmctld.pid`,
        `SlurmdPidFile=${folder}/slurmd.pid`,
        `SlurmctldLogFile=${folder}/log/slurmctld.log`,
        `SlurmdLogFile=${folder}/log/slurmd.log`,
        "ProctrackType=proctrack/linuxproc",
        "TaskPlugin=task/none",
        "JobAcctGatherType=jobacct_gather/none",
        "AccountingStorageType=accounting_storage/none",
        "SchedulerType=sched/backfill",
        "SelectType=select/cons_tres",
        "SelectTypeParameters=CR_Core",
        "ReturnToService=2",
        "MpiDefault=none",
        `NodeName=${host} NodeAddr=127.0.0.1 CPUs=2 State=UNKNOWN`,
        "PartitionName=quiver Nodes=ALL Default=YES MaxTime=INFINITE State=UP",
      ].join("\n") + "\n",
    );
    const env = { ...process.env, SLURM_CONF: conf };
    const daemon = (command: string, args: string[]) => {
      const child = spawn(command, args, { env, stdio: "ignore" });
      started.push(child);
      return child;
    };
    daemon("/usr/sbin/munged", [
      "-F",
      "--force",
      `--key-file=${folder}/munge.key`,
      `--socket=${folder}/munge.sock`,
      `--log-file=${folder}/log/munged.log`,
      `--pid-file=${folder}/munged.pid`,
      `--seed-file=${folder}/munged.seed`,
    ]);
    await until("munged's socket", CLUSTER_UP_MS, () => existsSync(`${folder}/munge.sock`));
    daemon("/usr/sbin/slurmctld", ["-D", "-f", conf]);
    daemon("/usr/sbin/slurmd", ["-D", "-f", conf]);
    await until("the node to be idle", CLUSTER_UP_MS, () => {
      const r = spawnSync("sinfo", ["-h", "-o", "%T"], { env, encoding: "utf8", timeout: 30_000 });
      return r.status === 0 && r.stdout.trim() === "idle";
    });

    // The single-machine run first, then the same folder emptied for the cluster: results
    // carry their paths, so equal paths give equal files.
    const dir = await demoFolder();
    const plan = `${dir}/tamarack_b2_plan.json`;
    const single = runQuiver(["run", plan, "--out-dir", `${dir}/out`, "--jobs", "1"]);
    expect(single.code, single.stderr).toBe(0);
    const reference = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    await rm(`${dir}/out`, { recursive: true });

    const script = runQuiver(["run", plan, "--slurm-script", "3", "--out-dir", `${dir}/out`]);
    expect(script.code, script.stderr).toBe(0);
    await writeFile(`${dir}/submit.sh`, script.stdout);
    const submit = spawnSync("bash", [`${dir}/submit.sh`], {
      env,
      encoding: "utf8",
      timeout: 60_000,
    });
    expect(submit.status, submit.stderr).toBe(0);
    expect(submit.stdout).toMatch(/shards: job array \d+, merge: job \d+/);
    await until("the merged manifest", CAMPAIGN_MS, () => {
      const queue = spawnSync("squeue", ["-h"], { env, encoding: "utf8", timeout: 30_000 });
      if (queue.status !== 0 || queue.stdout.trim() !== "") return false;
      return existsSync(`${dir}/out/manifest.json`);
    });
    const merged = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    const log = existsSync(`${dir}/out/slurm-merge.log`)
      ? await readFile(`${dir}/out/slurm-merge.log`, "utf8")
      : "";
    expect(merged.status, log).toBe("ok");
    expect(merged.shards).toBe(3);
    expect(merged.steps.map((s: { id: string }) => s.id)).toEqual(
      reference.steps.map((s: { id: string }) => s.id),
    );
    reference.steps.forEach(
      (s: { id: string; outputs: Record<string, { sha256: string }> }, i: number) => {
        for (const [key, file] of Object.entries(s.outputs)) {
          expect(merged.steps[i].outputs[key]?.sha256, `${s.id} ${key}`).toBe(file.sha256);
        }
      },
    );
    expect(merged.targets).toEqual(reference.targets);
    expect(existsSync(`${dir}/out/report.html`)).toBe(true);
    for (const k of [1, 2, 3]) {
      expect(existsSync(`${dir}/out/slurm-shard-${k}.log`), `shard ${k}'s log`).toBe(true);
    }
    await rm(dir, { recursive: true, force: true });
  }, CAMPAIGN_MS + 2 * CLUSTER_UP_MS + 300_000);
});
