/**
 * `quiver history` and `quiver run --history` as a user runs them (a SQLite
 * file): the formats of list and trend, the report, and the refusals with
 * their exit codes (1 data, 2 usage) and messages.
 */
import { existsSync } from "node:fs";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { HISTORY_TIMEOUT_MS, twoRuns } from "./history_suite.ts";
import { LEQ_LIMIT_DB, runInputs, sineLeqDb } from "./history_runs.ts";

let dir = "";
let pre = "", cm1 = "";
let db = "";

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-history-cli-");
  ({ pre, cm1 } = await twoRuns(dir));
  db = join(dir, "history.sqlite");
  for (const [run, build] of [[pre, "pre"], [cm1, "CM1"]]) {
    const r = runQuiver(["history", "add", run, "--db", db, "--build", build, "--vehicle", "E5"]);
    if (r.code !== 0) throw new Error(r.stderr);
  }
}, HISTORY_TIMEOUT_MS);
afterAll(async () => {
  if (dir !== "") await rm(dir, { recursive: true, force: true });
});

describe("quiver history", () => {
  test("trend as text, CSV and JSON: the build first, then value, limit and verdict", () => {
    const text = runQuiver(["history", "trend", "--db", db, "--target", "cabin_leq"]);
    expect(text.code, text.stderr).toBe(0);
    const rows = text.stdout.trim().split("\n").map((l) => l.split(/\s+/));
    expect(rows[0].slice(0, 4)).toEqual(["build", "value", "limit", "verdict"]);
    // ISO 1683: 20·lg(1 Pa / 20 µPa) = 93.979 dB; half the pressure, 6.0206 dB less.
    expect(rows.slice(1).map((r) => [r[0], r[1], r[2], r[3]])).toEqual([
      ["pre", "93.979", String(LEQ_LIMIT_DB), "fail"],
      ["CM1", "87.959", String(LEQ_LIMIT_DB), "pass"],
    ]);

    const csv = runQuiver([
      "history",
      "trend",
      "--db",
      db,
      "--target",
      "cabin_leq",
      "--format",
      "csv",
    ]);
    expect(csv.code, csv.stderr).toBe(0);
    const lines = csv.stdout.trim().split("\n").map((l) => l.split(","));
    expect(lines[0]).toEqual(["build", "value", "limit", "verdict", "unit", "run", "started"]);
    expect(lines.slice(1).map((l) => [l[0], l[2], l[3], l[4], l[5]])).toEqual([
      ["pre", "90", "fail", "dB", "1"],
      ["CM1", "90", "pass", "dB", "2"],
    ]);
    // CSV keeps full precision.
    assertClose(Number(lines[1][1]), sineLeqDb(1), { absolute: 0.05, relative: 0 });
    assertClose(Number(lines[2][1]), sineLeqDb(0.5), { absolute: 0.05, relative: 0 });

    const json = runQuiver([
      "history",
      "trend",
      "--db",
      db,
      "--target",
      "rear_leq",
      "--format",
      "json",
    ]);
    expect(json.code, json.stderr).toBe(0);
    // Not checked: null, never 0 (the plan names a channel the recording lacks).
    expect(
      JSON.parse(json.stdout).map((p: Record<string, unknown>) => [p.build, p.value, p.verdict]),
    )
      .toEqual([["pre", null, "not_checked"], ["CM1", null, "not_checked"]]);
  }, HISTORY_TIMEOUT_MS);

  test("list in order of addition, as JSON and CSV", () => {
    const json = runQuiver(["history", "list", "--db", db, "--format", "json"]);
    expect(json.code, json.stderr).toBe(0);
    const runs = JSON.parse(json.stdout) as Record<string, unknown>[];
    expect(runs.map((r) => [r.run, r.build, r.vehicle, r.targets_passed, r.targets])).toEqual([
      [1, "pre", "E5", 0, 2],
      [2, "CM1", "E5", 1, 2],
    ]);
    const csv = runQuiver(["history", "list", "--db", db, "--format", "csv"]);
    expect(csv.stdout.split("\n")[0].split(",").slice(0, 3)).toEqual(["run", "build", "vehicle"]);
    expect(csv.stdout.trim().split("\n").length).toBe(3);
  }, HISTORY_TIMEOUT_MS);

  test("report: one plot of each target against build, failing runs marked", async () => {
    const out = join(dir, "trend.html");
    const r = runQuiver(["history", "report", "--db", db, "--out", out]);
    expect(r.code, r.stderr).toBe(0);
    const html = await readFile(out, "utf8");
    expect(html).toContain('id="target-cabin_leq"');
    expect(html).toContain('id="target-rear_leq"');
    const cabin = html.slice(
      html.indexOf('id="target-cabin_leq"'),
      html.indexOf('id="target-rear_leq"'),
    );
    // Two bars (pre, CM1), the first over the limit.
    expect((cabin.match(/<rect class="bar/g) ?? []).length).toBe(2);
    expect((cabin.match(/<rect class="bar failing"/g) ?? []).length).toBe(1);
    expect(html).toContain("not a certified instrument");
    // Writing over the database is refused.
    const over = runQuiver(["history", "report", "--db", db, "--out", db]);
    expect(over.code).toBe(2);
  }, HISTORY_TIMEOUT_MS);

  test("refusals: a changed result (exit 1, the file named), bad usage (exit 2)", async () => {
    const result = join(pre, "cabin_level.json");
    const original = await readFile(result);
    try {
      await writeFile(result, `${new TextDecoder().decode(original)} `);
      const r = runQuiver(["history", "add", pre, "--db", db, "--build", "pre"]);
      expect(r.code).toBe(1);
      expect(r.stderr).toMatch(/cabin_level\.json changed since the run/);
    } finally {
      await writeFile(result, original);
    }
    const usage = [
      [["history", "list"], /--db/],
      [["history", "add", pre, "--db", db], /needs --build/],
      [["history", "trend", "--db", db], /needs --target/],
      [["history", "list", "--db", db, "--target", "x"], /takes no --target/],
      [["history", "drop", "--db", db], /subcommand/],
      [["history", "list", "--db", join(dir, "none.sqlite")], /no history database here/],
      [["history", "trend", "--db", db, "--target", "cabin_lq"], /did you mean "cabin_leq"/],
      [["history", "add", pre, "--db", db, "--build", "B9"], /already in the history as run 1/],
    ] as const;
    for (const [args, message] of usage) {
      const r = runQuiver(args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stderr, args.join(" ")).toMatch(message);
    }
    expect(existsSync(join(dir, "none.sqlite"))).toBe(false);
    // A file that is not SQLite is bad data, named.
    const notDb = join(dir, "notes.txt");
    await writeFile(notDb, "not a database, just some words in a file of some length\n".repeat(40));
    const r = runQuiver(["history", "list", "--db", notDb]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain("notes.txt");
  }, HISTORY_TIMEOUT_MS);
});

describe("quiver run --history", () => {
  test("the finished run is added under its build; --history and --build go together", async () => {
    const plan = await runInputs(join(dir, "b2"), 0.5);
    const runDb = join(dir, "run_history.sqlite");
    const r = runQuiver([
      "run",
      plan,
      "--out-dir",
      join(dir, "b2", "out"),
      "--history",
      runDb,
      "--build",
      "B2",
    ]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/history: run 1 \(build B2/);
    const trend = runQuiver([
      "history",
      "trend",
      "--db",
      runDb,
      "--target",
      "cabin_leq",
      "--format",
      "json",
    ]);
    const points = JSON.parse(trend.stdout);
    expect(points.map((p: Record<string, unknown>) => [p.build, p.verdict])).toEqual([[
      "B2",
      "pass",
    ]]);
    assertClose(points[0].value, sineLeqDb(0.5), { absolute: 0.05, relative: 0 });
    const alone = runQuiver(["run", plan, "--history", runDb]);
    expect(alone.code).toBe(2);
    expect(alone.stderr).toMatch(/--history and --build go together/);
  }, HISTORY_TIMEOUT_MS);
});
