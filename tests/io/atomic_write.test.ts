import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import process from "node:process";
import { writeFileAtomic } from "../../lib/io/atomic_write.ts";

describe("writeFileAtomic", () => {
  test("replaces an existing file and leaves no temporary file behind", async () => {
    const dir = await mkdtemp("/tmp/quiver-test-");
    await writeFile(`${dir}/out.csv`, "old\n");
    await writeFileAtomic(`${dir}/out.csv`, "new\n");
    expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("new\n");
    expect(await readdir(dir)).toEqual(["out.csv"]);
  });

  test("a failed write leaves the old file untouched and cleans up", async () => {
    const dir = await mkdtemp("/tmp/quiver-test-");
    await writeFile(`${dir}/out.csv`, "old\n");
    await expect(writeFileAtomic(`${dir}/missing/out.csv`, "new\n")).rejects.toThrow();
    expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("old\n");
    expect(await readdir(dir)).toEqual(["out.csv"]);
  });

  test("leftovers of a killed write to the same path are removed by the next write", async () => {
    const dir = await mkdtemp("/tmp/quiver-test-");
    // A process id that cannot run (above the kernel's pid_max), and one that runs: ours
    // is taken by the current write itself, so use the parent's, which outlives the test.
    await writeFile(`${dir}/.out.csv.tmp-999999999-abc`, "half");
    await writeFile(`${dir}/.out.csv.tmp-${process.ppid}-def`, "another writer at work");
    await writeFile(`${dir}/.other.csv.tmp-999999999-abc`, "not ours to clean");
    await writeFileAtomic(`${dir}/out.csv`, "new\n");
    expect((await readdir(dir)).sort()).toEqual([
      `.other.csv.tmp-999999999-abc`,
      `.out.csv.tmp-${process.ppid}-def`,
      "out.csv",
    ].sort());
  });
});
