import { lstat, mkdir, mkdtemp, readdir, readFile, rm, symlink, writeFile } from "node:fs/promises";
import { execFileSync } from "node:child_process";
import { describe, expect, test } from "vitest";
import process from "node:process";
import { commitTemporary, writeFileAtomic, writeTemporary } from "../../lib/io/atomic_write.ts";

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

describe("writeFileAtomic replaces only regular files", () => {
  test("a FIFO is refused and stays a FIFO (no open: a FIFO would block it)", async () => {
    const dir = await mkdtemp("/tmp/quiver-test-");
    execFileSync("mkfifo", [`${dir}/pipe`]);
    await expect(writeFileAtomic(`${dir}/pipe`, "new\n")).rejects.toThrow(
      /the target .*pipe is a FIFO \(named pipe\); quiver replaces only regular files/,
    );
    expect((await lstat(`${dir}/pipe`)).isFIFO()).toBe(true);
    expect(await readdir(dir)).toEqual(["pipe"]);
  });

  test("a character device node is refused and stays a device", async (context) => {
    const dir = await mkdtemp("/tmp/quiver-test-");
    // 1,3 is /dev/null's major/minor (Linux devices.txt); making a node needs root.
    try {
      execFileSync("mknod", [`${dir}/null`, "c", "1", "3"], { stdio: "ignore" });
    } catch {
      context.skip("mknod failed (not root, or no CAP_MKNOD): a device node cannot be made here");
    }
    await expect(writeFileAtomic(`${dir}/null`, "new\n")).rejects.toThrow(
      /is a character device; quiver replaces only regular files/,
    );
    expect((await lstat(`${dir}/null`)).isCharacterDevice()).toBe(true);
    expect(await readdir(dir)).toEqual(["null"]);
  });

  test("a folder and a symbolic link are refused; the link and its target are untouched", async () => {
    const dir = await mkdtemp("/tmp/quiver-test-");
    await mkdir(`${dir}/folder`);
    await writeFile(`${dir}/target.csv`, "old\n");
    await symlink(`${dir}/target.csv`, `${dir}/link.csv`);
    await expect(writeFileAtomic(`${dir}/folder`, "new\n")).rejects.toThrow(/is a folder/);
    await expect(writeFileAtomic(`${dir}/link.csv`, "new\n")).rejects.toThrow(
      /is a symbolic link; quiver does not write through links/,
    );
    expect((await lstat(`${dir}/link.csv`)).isSymbolicLink()).toBe(true);
    expect(await readFile(`${dir}/target.csv`, "utf8")).toBe("old\n");
    expect((await readdir(dir)).sort()).toEqual(["folder", "link.csv", "target.csv"]);
  });

  test("a regular file that became a FIFO between write and rename is not replaced", async () => {
    const dir = await mkdtemp("/tmp/quiver-test-");
    await writeFile(`${dir}/out.csv`, "old\n");
    const temporary = await writeTemporary(`${dir}/out.csv`, "new\n");
    await rm(`${dir}/out.csv`);
    execFileSync("mkfifo", [`${dir}/out.csv`]);
    await expect(commitTemporary(temporary, `${dir}/out.csv`)).rejects.toThrow(/FIFO/);
    expect((await lstat(`${dir}/out.csv`)).isFIFO()).toBe(true);
    expect(await readdir(dir)).toEqual(["out.csv"]); // the temporary file is gone too
  });
});
