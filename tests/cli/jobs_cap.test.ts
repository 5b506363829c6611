import { mkdtemp, readdir, writeFile } from "node:fs/promises";
import { totalmem } from "node:os";
import { describe, expect, test } from "vitest";
import { capJobs, WORKER_MEMORY_BYTES } from "../../cli/worker_pool.ts";
import { runQuiver } from "../helpers/cli.ts";

describe("run --jobs is capped by the cores and by memory, and says so", () => {
  test("more jobs than cores: the cores", () => {
    const c = capJobs(1000, { cores: 2, memoryBytes: 64 * 2 ** 30 });
    expect(c.jobs).toBe(2);
    expect(c.note).toBe("--jobs 1000 capped at 2: 2 CPU cores");
  });

  test("memory for fewer workers than cores: the memory, naming the estimate", () => {
    // 4 GiB, half for workers at 512 MiB each: 4 workers, fewer than 16 cores.
    const c = capJobs(16, { cores: 16, memoryBytes: 4 * 2 ** 30 });
    expect(c.jobs).toBe(4);
    // 16 cores did not cap 16 jobs: only the memory is named.
    expect(c.note).toBe(
      "--jobs 16 capped at 4: memory for 4 worker(s) at 512 MiB each in half of 4 GiB",
    );
  });

  test("within both: unchanged, nothing said; never below one", () => {
    expect(capJobs(2, { cores: 8, memoryBytes: 64 * 2 ** 30 })).toEqual({ jobs: 2 });
    expect(capJobs(4, { cores: 4, memoryBytes: 2 ** 20 }).jobs).toBe(1);
    expect(() => capJobs(0, { cores: 2, memoryBytes: 2 ** 30 })).toThrow(RangeError);
  });

  test("quiver run --jobs 1000 says what it capped at and runs the plan", async () => {
    const dir = await mkdtemp("/tmp/quiver-jobs-");
    const rows = Array.from({ length: 512 }, (_, i) => `${i / 100},${Math.sin(i / 3)}`);
    await writeFile(`${dir}/r.csv`, "time_s,a [V]\n" + rows.join("\n") + "\n");
    const analyses = Array.from({ length: 6 }, (_, i) => ({
      id: `psd${i}`,
      command: "spectrum",
      recording: "r",
      options: { block: 64 },
    }));
    await writeFile(
      `${dir}/plan.json`,
      JSON.stringify({
        quiver_plan: 1,
        title: "jobs",
        recordings: { r: { file: "r.csv" } },
        analyses,
      }),
    );
    const r = runQuiver(["run", "plan.json", "--out-dir", "out", "--jobs", "1000"], dir);
    expect(r.code, r.stderr).toBe(0);
    const cores = navigator.hardwareConcurrency;
    const byMemory = Math.floor(totalmem() / 2 / WORKER_MEMORY_BYTES);
    const expected = Math.max(1, Math.min(1000, cores, byMemory));
    expect(r.stderr).toMatch(new RegExp(`^run: --jobs 1000 capped at ${expected}: `, "m"));
    expect((await readdir(`${dir}/out`)).filter((n) => /^psd\d\.json$/.test(n))).toHaveLength(6);
  }, 600_000);
});
