import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { existsSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { QUIVER_VERSION } from "../../lib/version.ts";

describe("usage messages in quiver's words", () => {
  test("a mistyped option names the nearest valid one, exit 2", () => {
    const r = runQuiver(["spectrum", "x.csv", "--windwo", "hann"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(
      "quiver spectrum: unknown option --windwo; did you mean --window? (--help lists the options)",
    );
    expect(r.stderr).not.toMatch(/positional argument/);
  });

  test("an option without its value says so; a negative value needs --opt=VALUE", () => {
    expect(runQuiver(["spectrum", "x.csv", "--block"]).stderr).toMatch(/--block needs a value/);
    expect(runQuiver(["spectrum", "x.csv", "--block", "-1"]).stderr).toMatch(
      /--block needs a value; for one that starts with "-" write --block=VALUE/,
    );
  });

  test("every bad option value is named at once", () => {
    const r = runQuiver(["spectrum", "x.csv", "--block=-1", "--overlap", "2"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--block: .*; --overlap: /);
  });

  test("quiver --version prints the version", () => {
    const r = runQuiver(["--version"]);
    expect(r.code).toBe(0);
    expect(r.stdout.trim()).toBe(`quiver ${QUIVER_VERSION}`);
  });
});

describe("a plan with several errors", () => {
  test("reports all of them at once, before any work", async () => {
    const dir = await mkdtemp("/tmp/quiver-plan-errors-");
    await writeFile(`${dir}/r.csv`, "time_s,a [m/s^2]\n0,1\n0.001,2\n");
    const plan = {
      quiver_plan: 1,
      title: "three mistakes",
      recordings: { r: { file: "r.csv" }, gone: { file: "gone.csv" } },
      analyses: [
        { id: "s", command: "spectrum", recording: "r", options: { windwo: "hann" } },
        { id: "t", command: "spectrum", recording: "nowhere", options: {} },
      ],
      targets: [{
        id: "x",
        type: "max",
        value: 1,
        unit: "dB",
        of: { analysis: "missing", quantity: "leq_db" },
      }],
    };
    await writeFile(`${dir}/plan.json`, JSON.stringify(plan));
    const r = runQuiver(["run", `${dir}/plan.json`, "--out-dir", `${dir}/out`]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/the plan has 4 problems/);
    expect(r.stderr).toMatch(/plan key recordings\.gone\.file: no such file/);
    expect(r.stderr).toMatch(/plan key analyses\[0\]\.options\.windwo/);
    expect(r.stderr).toMatch(/plan key analyses\[1\]\.recording: no recording "nowhere"/);
    expect(r.stderr).toMatch(/plan key targets\[0\]\.of\.analysis: no analysis "missing"/);
    expect(existsSync(`${dir}/out`)).toBe(false);
  });

  test("schema errors are all reported too", async () => {
    const dir = await mkdtemp("/tmp/quiver-plan-schema-");
    await writeFile(
      `${dir}/plan.json`,
      JSON.stringify({ quiver_plan: 2, title: 5, recordings: {}, analyses: [] }),
    );
    const r = runQuiver(["run", `${dir}/plan.json`, "--out-dir", `${dir}/out`]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/plan key quiver_plan/);
    expect(r.stderr).toMatch(/plan key title/);
    expect(r.stderr).toMatch(/plan key analyses/);
    expect(await readFile(`${dir}/plan.json`, "utf8")).toMatch(/quiver_plan/);
  });
});
