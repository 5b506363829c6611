/**
 * `quiver diff` on the command line: what it writes, and what it refuses
 * (exit codes of cli/exit_codes.ts, one-line messages, nothing written).
 */
import { existsSync } from "node:fs";
import { cp, mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { diffRun } from "./diff_runs.ts";

let dir: string, base: string, other: string;

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-diff-cli-");
  base = await diffRun(dir, "base", { seed: 21, seconds: 8 });
  other = await diffRun(dir, "other", { seed: 22, seconds: 8 });
}, 300_000);
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

/** The message lines of stderr (a refusal says one). */
const lines = (stderr: string) => stderr.trim().split("\n").filter((l) => l.trim() !== "");

test("writes a table per spectral step, summary.json and diff.html", async () => {
  const r = runQuiver(["diff", base, other, "--out-dir", `${dir}/d1`, "--confidence", "0.9"]);
  expect(r.code, r.stderr).toBe(0);
  const header = (await readFile(`${dir}/d1/psd.csv`, "utf8")).split("\n")[0];
  expect(header).toBe(
    "frequency_hz,a_difference_db [dB],a_lower_db [dB],a_upper_db [dB],a_significant,b_difference_db [dB],b_lower_db [dB],b_upper_db [dB],b_significant",
  );
  expect(existsSync(`${dir}/d1/path.csv`)).toBe(true);
  const summary = JSON.parse(await readFile(`${dir}/d1/summary.json`, "utf8"));
  expect(summary.confidence).toBe(0.9);
  expect(summary.steps.compared).toEqual(["psd", "rms", "path"]);
  const html = await readFile(`${dir}/d1/diff.html`, "utf8");
  expect(html).toContain("not a certified instrument");
  expect(r.stderr).toContain("Engineering comparison only");
}, 120_000);

test(
  "a result whose hash is not its manifest's refuses the diff, naming the file (exit 1)",
  async () => {
    await cp(other, `${dir}/tampered`, { recursive: true });
    const file = `${dir}/tampered/rms.json`;
    await writeFile(file, (await readFile(file, "utf8")).replace('"averages":', '"averages": '));
    const r = runQuiver(["diff", base, `${dir}/tampered`, "--out-dir", `${dir}/d2`]);
    expect(r.code).toBe(1);
    expect(lines(r.stderr)).toHaveLength(1);
    expect(r.stderr).toContain(file);
    expect(r.stderr).toContain("SHA-256");
    expect(existsSync(`${dir}/d2/summary.json`)).toBe(false);
  },
  120_000,
);

test("a step whose units differ refuses the diff, naming both (exit 1)", async () => {
  const pa = await diffRun(dir, "pascal", { seed: 23, seconds: 8, unitA: "Pa" });
  const r = runQuiver(["diff", base, pa, "--out-dir", `${dir}/d3`]);
  expect(r.code).toBe(1);
  expect(lines(r.stderr)).toHaveLength(1);
  expect(r.stderr).toContain('step "psd"');
  expect(r.stderr).toContain("(m/s^2)^2/Hz");
  expect(r.stderr).toContain("Pa^2/Hz");
  expect(existsSync(`${dir}/d3/summary.json`)).toBe(false);
}, 180_000);

test("a folder that is no run, a confidence out of range, a run folder as output", () => {
  const none = runQuiver(["diff", base, dir, "--out-dir", `${dir}/d4`]);
  // A folder that is not a run is a wrong argument (exit 2), as for `report` and `history add`.
  expect(none.code).toBe(2);
  expect(lines(none.stderr)).toHaveLength(1);
  expect(none.stderr).toContain("no readable manifest.json here");
  const confidence = runQuiver([
    "diff",
    base,
    other,
    "--out-dir",
    `${dir}/d5`,
    "--confidence",
    "95",
  ]);
  expect(confidence.code).toBe(2);
  expect(lines(confidence.stderr)).toHaveLength(1);
  const into = runQuiver(["diff", base, other, "--out-dir", other]);
  expect(into.code).toBe(2);
  expect(into.stderr).toContain("one of the runs' folders");
  const one = runQuiver(["diff", base, "--out-dir", `${dir}/d6`]);
  expect(one.code).toBe(2);
}, 180_000);
