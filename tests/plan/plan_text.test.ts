/**
 * What a plan shows (its title, descriptions, step titles) reaches the report and the terminal
 * as it is: a bidirectional override would reorder the text around it ("Trojan Source",
 * CVE-2021-42574; Unicode Standard Annex #9), so such text is refused at plan check. Step ids
 * name files, so they are kept short enough for any file system.
 */
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

describe("text a plan shows, and ids that name files", () => {
  let dir: string;
  const base = () => ({
    quiver_plan: 1,
    title: "t",
    recordings: { road: { file: "road.csv" } },
    analyses: [
      { id: "psd", command: "spectrum", recording: "road", options: { block: 256 } } as Record<
        string,
        unknown
      >,
    ],
  } as Record<string, unknown> & { analyses: Record<string, unknown>[] });
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-plan-text-");
    const rows = ["time_s,acc [m/s^2]"];
    for (let i = 0; i < 2048; i++) rows.push(`${i / 1024},${Math.sin(i / 5)}`);
    await writeFile(join(dir, "road.csv"), rows.join("\n") + "\n");
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });
  const run = async (plan: unknown) => {
    await writeFile(join(dir, "plan.json"), JSON.stringify(plan));
    return runQuiver(["run", join(dir, "plan.json"), "--out-dir", join(dir, "out")]);
  };

  test("a right-to-left override in the title is refused, naming the key", async () => {
    const r = await run({ ...base(), title: "Build \u202e2 cba" });
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(
      "plan key title: holds a control, bidirectional or zero-width character, which would change how the report and the terminal show it",
    );
  });

  test("an escape sequence in a step title is refused; a description may hold line feeds", async () => {
    const plan = base();
    plan.analyses[0].title = "PSD \u001b[2J";
    const r = await run(plan);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/plan key analyses\[0\]\.title: holds a control/);
    const ok = await run({ ...base(), description: "line one\nline two" });
    expect(ok.code, ok.stderr).toBe(0);
  });

  test("a step id of 101 characters is refused before any work; 100 is accepted", async () => {
    const long = base();
    long.analyses[0].id = "a".repeat(101);
    const r = await run(long);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(
      "plan key analyses[0].id: ids are at most 100 characters (they name the step's files)",
    );
    const ok = base();
    ok.analyses[0].id = "a".repeat(100);
    const fine = await run(ok);
    expect(fine.code, fine.stderr).toBe(0);
  });
});
