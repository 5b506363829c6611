import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
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
});
