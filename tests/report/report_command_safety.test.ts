/**
 * `quiver report` repeats `run`'s checks before it writes anything: the plan
 * must be the file the run read, the verdicts must follow from the verified
 * results, figures go only into a real folder of the output folder, and a
 * figure's file name made from a channel name cannot climb out of it.
 * OWASP, Path Traversal: paths from data are built from an allow-list.
 */
import { existsSync } from "node:fs";
import {
  mkdir,
  mkdtemp,
  readdir,
  readFile,
  rename,
  rm,
  symlink,
  writeFile,
} from "node:fs/promises";
import { hostname } from "node:os";
import { join } from "node:path";
import process from "node:process";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

describe("quiver report checks what it is given", () => {
  let dir: string;
  const plan = {
    quiver_plan: 1,
    title: "report safety",
    recordings: { road: { file: "road.csv" } },
    analyses: [
      { id: "psd", command: "spectrum", recording: "road", options: { block: 256 } },
      { id: "lvl", command: "level", recording: "road", options: { weighting: "Z" } },
      { id: "map", command: "spectrogram", recording: "road", options: { block: 256 } },
    ],
    // The record's level is far above 10 dB: this target fails.
    targets: [{
      id: "quiet",
      type: "max",
      value: 10,
      unit: "dB",
      of: { analysis: "lvl", quantity: "leq_db", channel: "a/../../../victim/pwn" },
    }],
    report: {},
  };
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-report-safety-");
    await mkdir(join(dir, "victim"));
    // A channel name that is a path climbing out of the output folder.
    const rows = ["time_s,a/../../../victim/pwn [Pa]"];
    for (let i = 0; i < 4096; i++) rows.push(`${i / 1024},${Math.sin(i / 5)}`);
    await writeFile(join(dir, "road.csv"), rows.join("\n") + "\n");
    await writeFile(join(dir, "plan.json"), JSON.stringify(plan));
    const r = runQuiver(["run", join(dir, "plan.json"), "--out-dir", join(dir, "out")]);
    expect(r.code, r.stderr).toBe(0);
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  test("a channel name with ../ becomes a figure inside figures/, nothing outside", async () => {
    expect(await readdir(join(dir, "victim"))).toEqual([]);
    const figures = await readdir(join(dir, "out", "figures"));
    expect(figures).toContain("map_a_______victim_pwn_spectrogram.svg");
    for (const f of figures) expect(f).toMatch(/^[A-Za-z0-9_][A-Za-z0-9_.-]*\.svg$/);
    const r = runQuiver(["report", join(dir, "out")]);
    expect(r.code, r.stderr).toBe(0);
    expect(await readdir(join(dir, "victim"))).toEqual([]);
  });

  test("a forged verdict in the manifest is refused, not shown", async () => {
    const file = join(dir, "out", "manifest.json");
    const original = await readFile(file, "utf8");
    const manifest = JSON.parse(original);
    expect(manifest.targets[0].pass).toBe(false);
    manifest.targets[0].pass = true;
    manifest.targets[0].margin = 1;
    await writeFile(file, JSON.stringify(manifest));
    const before = await readFile(join(dir, "out", "report.html"), "utf8");
    const r = runQuiver(["report", join(dir, "out")]);
    await writeFile(file, original);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/target verdicts are not those its results give/);
    expect(await readFile(join(dir, "out", "report.html"), "utf8")).toBe(before);
  });

  test("a plan edited after the run (report file ../) is refused by its hash", async () => {
    const file = join(dir, "plan.json");
    const original = await readFile(file, "utf8");
    await writeFile(file, JSON.stringify({ ...plan, report: { file: "../escaped.html" } }));
    const r = runQuiver(["report", join(dir, "out")]);
    await writeFile(file, original);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/the plan changed since the run/);
    expect(existsSync(join(dir, "escaped.html"))).toBe(false);
  });

  test("a report lists its figures in the manifest (the next run's clean-up reads them)", async () => {
    const r = runQuiver(["report", join(dir, "out")]);
    expect(r.code, r.stderr).toBe(0);
    const manifest = JSON.parse(await readFile(join(dir, "out", "manifest.json"), "utf8"));
    const listed = manifest.report_files.map((f: { path: string }) => f.path).sort();
    const figures = (await readdir(join(dir, "out", "figures"))).map((f) => `figures/${f}`);
    expect(listed).toEqual(["report.html", ...figures].sort());
  });

  test("a folder that a run is writing (its lock held) gets no report", async () => {
    const lock = join(dir, "out", ".quiver-lock.json");
    await writeFile(
      lock,
      JSON.stringify({ pid: process.pid, host: hostname(), started: "x", kind: "run" }),
    );
    const r = runQuiver(["report", join(dir, "out")]);
    await rm(lock);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
  });

  test("a run that was aborted gets no report", async () => {
    const file = join(dir, "out", "manifest.json");
    const original = await readFile(file, "utf8");
    await writeFile(file, JSON.stringify({ ...JSON.parse(original), status: "aborted" }));
    const r = runQuiver(["report", join(dir, "out")]);
    await writeFile(file, original);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/did not finish \(its manifest says aborted\)/);
  });

  test("a figures/ link leading out of the folder is not followed", async () => {
    const figures = join(dir, "out", "figures");
    await rename(figures, join(dir, "out", "figures.kept"));
    await mkdir(join(dir, "elsewhere"));
    await symlink(join(dir, "elsewhere"), figures);
    const r = runQuiver(["report", join(dir, "out")]);
    await rm(figures);
    await rename(join(dir, "out", "figures.kept"), figures);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/figures.* (is a symbolic link|leads outside)/);
    expect(await readdir(join(dir, "elsewhere"))).toEqual([]);
  });
});
