import { existsSync } from "node:fs";
import { readdir, readFile, rm, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { joinShardSteps } from "../../lib/plan/merge.ts";
import { assignShards, parseShard } from "../../lib/plan/shards.ts";
import { slurmScript } from "../../lib/plan/slurm.ts";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

describe("the shard rule", () => {
  const step = (id: string, needs: string[] = [], inputs: string[] = []) => ({ id, needs, inputs });

  test("dependent steps stay together, groups go largest first to the least-loaded shard", () => {
    const size: Record<string, number> = { big: 100, mid: 60, small: 30, tiny: 20 };
    const steps = [
      step("a", [], ["big"]),
      step("a_modes", ["a"]),
      step("a_mac", ["a_modes"]),
      step("b", [], ["mid"]),
      step("c", [], ["small"]),
      step("c_vs_sim", ["c"], ["tiny"]),
      step("d", [], ["tiny"]),
    ];
    const shards = assignShards(steps, 2, (f) => size[f]);
    // Groups: {a, a_modes, a_mac} 100, {b} 60, {c, c_vs_sim} 50, {d} 20. Dealt largest first
    // to the least-loaded shard: a→1 (100), b→2 (60), c→2 (110), d→1 (120).
    expect(shards).toEqual([1, 1, 1, 2, 2, 2, 1]);
    // The same plan gives the same shards every time.
    expect(assignShards(steps, 2, (f) => size[f])).toEqual(shards);
    // A file a step writes weighs nothing, whether it exists yet or not: with "big" written by
    // a step w, a's group weighs 0 and is dealt last: b 60→1, c 50→2, d 20→2 (70), then a and
    // w (0 each) to shard 1 (60).
    const written = [...steps, { ...step("w"), outputs: { out: "big" } }];
    expect(assignShards(written, 2, (f) => size[f])).toEqual([1, 1, 1, 1, 2, 2, 2, 1]);
  });

  test("K/N and auto (a Slurm job array) parse; anything else is refused", () => {
    expect(parseShard("3/3")).toEqual({ index: 3, count: 3 });
    expect(() => parseShard("4/3")).toThrow(/between 1 and/);
    expect(() => parseShard("0/3")).toThrow(/between 1 and/);
    expect(() => parseShard("two")).toThrow(/K\/N/);
    expect(() => parseShard("auto", {})).toThrow(/Slurm job array/);
    expect(
      parseShard("auto", {
        SLURM_ARRAY_TASK_ID: "2",
        SLURM_ARRAY_TASK_MIN: "1",
        SLURM_ARRAY_TASK_COUNT: "3",
      }),
    ).toEqual({ index: 2, count: 3 });
  });

  test("the Slurm script submits an array of N shards and a merge that waits for it", () => {
    const s = slurmScript({
      shards: 4,
      plan: "/data/it's here/plan.json",
      outDir: "/data/out",
      deno: "/usr/bin/deno",
      main: "/opt/quiver/cli/main.ts",
      partition: "nvh",
      time: "02:00:00",
      cpus: 2,
    });
    expect(s).toContain("--array=1-4");
    expect(s).toContain("--partition='nvh'");
    expect(s).toContain("--time='02:00:00'");
    expect(s).toContain("--cpus-per-task=2");
    expect(s).toContain("--dependency=afterany:${shards%%;*}");
    // A quote inside a path survives bash's quoting.
    expect(s).toContain(`'\\''`);
    expect(s).toMatch(/--shard auto --jobs 2 --out-dir/);
  });

  test("joining shard manifests is one pass: 100 000 steps in plan order", () => {
    // Linear by construction (a map by id); here: right on a campaign of 100 000 steps.
    const n = 100_000;
    const order = Array.from({ length: n }, (_, i) => `s${i}`);
    const shards: ReturnType<typeof record>[][] = [[], [], [], []];
    function record(id: string) {
      return {
        id,
        kind: "analysis",
        command: "spectrum",
        argv: [],
        inputs: [],
        outputs: {},
        status: "ok" as const,
        seconds: 0,
      };
    }
    for (let i = n - 1; i >= 0; i--) shards[(i * 7) % 4].push(record(order[i]));
    const steps = joinShardSteps(order, shards);
    expect(steps).toHaveLength(n);
    expect(steps[0].id).toBe("s0");
    expect(steps[n - 1].id).toBe(`s${n - 1}`);
    shards[2].pop();
    expect(() => joinShardSteps(order, shards)).toThrow(/no shard ran 1 step/);
  });
});

describe("a sharded campaign on one machine", () => {
  let dir = "";
  let single: {
    steps: { id: string; status: string; outputs: Record<string, { sha256: string }> }[];
    targets: unknown[];
  };
  beforeAll(async () => {
    dir = await demoFolder();
    const r = runQuiver([
      "run",
      `${dir}/tamarack_b2_plan.json`,
      "--out-dir",
      `${dir}/out`,
      "--jobs",
      "1",
    ]);
    expect(r.code, r.stderr).toBe(0);
    single = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    // The same folder again, emptied: results embed their paths, so equal paths give equal files.
    await rm(`${dir}/out`, { recursive: true });
  });

  test("three shards and a merge give the single run's results, targets and report", async () => {
    for (const k of [1, 2, 3]) {
      const r = runQuiver([
        "run",
        `${dir}/tamarack_b2_plan.json`,
        "--out-dir",
        `${dir}/out`,
        "--shard",
        `${k}/3`,
        "--jobs",
        "1",
      ]);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stderr).toContain(`shard ${k} of 3`);
    }
    const names = (await readdir(`${dir}/out`)).filter((n) => n.startsWith("manifest"));
    expect(names.sort()).toEqual([
      "manifest.shard-1-of-3.json",
      "manifest.shard-2-of-3.json",
      "manifest.shard-3-of-3.json",
    ]);
    // Each shard ran a part: none ran everything.
    for (const name of names) {
      const part = JSON.parse(await readFile(`${dir}/out/${name}`, "utf8"));
      expect(part.steps.length).toBeGreaterThan(0);
      expect(part.steps.length).toBeLessThan(single.steps.length);
      expect(part.targets).toEqual([]);
    }
    const m = runQuiver(["merge", `${dir}/out`]);
    expect(m.code, m.stderr).toBe(0);
    const merged = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    expect(merged.shards).toBe(3);
    expect(merged.steps.map((s: { id: string }) => s.id)).toEqual(
      single.steps.map((s) => s.id),
    );
    for (const [i, s] of single.steps.entries()) {
      const other = merged.steps[i];
      expect(other.status, s.id).toBe(s.status);
      expect(Object.keys(other.outputs).sort(), s.id).toEqual(Object.keys(s.outputs).sort());
      for (const [key, file] of Object.entries(s.outputs)) {
        expect(other.outputs[key].sha256, `${s.id} ${key}`).toBe(file.sha256);
      }
    }
    expect(merged.targets).toEqual(single.targets);
    expect(existsSync(`${dir}/out/report.html`)).toBe(true);
  });

  test("a shard with a failed step merges as a failed run (exit 1); an unfinished shard is named", async () => {
    const name = `${dir}/out/manifest.shard-3-of-3.json`;
    const original = await readFile(name, "utf8");
    const part = JSON.parse(original);
    part.steps[0] = {
      ...part.steps[0],
      status: "failed",
      error: "broken.csv:3: bad row",
      outputs: {},
    };
    await writeFile(name, JSON.stringify(part));
    const failed = runQuiver(["merge", `${dir}/out`]);
    expect(failed.code).toBe(1);
    expect(failed.stderr).toContain(`${part.steps[0].id}: failed: broken.csv:3: bad row`);
    const merged = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    expect(merged.status).toBe("failed");
    // A shard still running (or killed) is not merged.
    await writeFile(
      name,
      JSON.stringify({ ...JSON.parse(original), status: "running", finished: null }),
    );
    await rm(`${dir}/out/manifest.json`);
    const unfinished = runQuiver(["merge", `${dir}/out`]);
    expect(unfinished.code).toBe(1);
    expect(unfinished.stderr).toMatch(/shard 3 of 3 did not finish/);
    expect(existsSync(`${dir}/out/manifest.json`)).toBe(false);
    await writeFile(name, original);
  });

  test("a missing shard is named and the merge exits non-zero, writing nothing", async () => {
    await rm(`${dir}/out/manifest.shard-2-of-3.json`);
    await rm(`${dir}/out/manifest.json`, { force: true });
    const m = runQuiver(["merge", `${dir}/out`]);
    expect(m.code).toBe(1);
    expect(m.stderr).toMatch(/shard 2 of 3 is missing/);
    expect(existsSync(`${dir}/out/manifest.json`)).toBe(false);
  });
});
