/**
 * A plan's inputs must be regular files: a FIFO or a device would hang the run in the hash
 * that records it (a FIFO waits for a writer, /dev/zero never ends), and a folder is no
 * recording. Each is refused before any work, naming the plan key, with exit 2.
 */
import { execFileSync } from "node:child_process";
import { mkdir, mkdtemp, rm, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

describe("plan inputs that are not regular files", () => {
  let dir: string;
  const plan = (file: string, setup?: string) => ({
    quiver_plan: 1,
    title: "kinds",
    recordings: { road: { file, ...(setup !== undefined ? { setup } : {}) } },
    analyses: [{ id: "psd", command: "spectrum", recording: "road", options: { block: 256 } }],
  });
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-plan-kinds-");
    const rows = ["time_s,acc [m/s^2]"];
    for (let i = 0; i < 2048; i++) rows.push(`${i / 1024},${Math.sin(i / 5)}`);
    await writeFile(join(dir, "road.csv"), rows.join("\n") + "\n");
    execFileSync("mkfifo", [join(dir, "pipe.csv")]);
    await mkdir(join(dir, "folder.csv"));
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  const cases: [string, () => object, RegExp][] = [
    ["a FIFO recording", () => plan("pipe.csv"), /recordings\.road\.file: pipe\.csv is a FIFO/],
    [
      "/dev/zero",
      () => plan("/dev/zero"),
      /recordings\.road\.file: \/dev\/zero is a character device/,
    ],
    ["a folder", () => plan("folder.csv"), /recordings\.road\.file: folder\.csv is a folder/],
    [
      "a FIFO set-up",
      () => plan("road.csv", "pipe.csv"),
      /recordings\.road\.setup: pipe\.csv is a FIFO/,
    ],
  ];
  for (const [name, make, message] of cases) {
    test(`${name} is refused before any work`, async () => {
      const file = join(dir, "plan.json");
      await writeFile(file, JSON.stringify(make()));
      const r = runQuiver(["run", file, "--out-dir", join(dir, "out")]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toMatch(message);
    });
  }

  test("a plan that is a FIFO is refused, not waited on", () => {
    const r = runQuiver(["run", join(dir, "pipe.csv"), "--out-dir", join(dir, "out")]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/a plan must be a regular file; this is a FIFO/);
  });
});
