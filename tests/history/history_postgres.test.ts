/**
 * The history on a PostgreSQL server: the shared suite, against a server
 * this test starts from Debian's postgresql binaries in a temporary folder
 * (tests/helpers/postgres_server.ts) and stops by its PID. Without the
 * binaries the suite is skipped, and the reason is printed.
 */
import { mkdtemp, rm } from "node:fs/promises";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { openPostgresStore } from "../../lib/history/postgres_store.ts";
import { postgresMissing, startPostgres, type TestPostgres } from "../helpers/postgres_server.ts";
import { runQuiver } from "../helpers/cli.ts";
import { historySuite, twoRuns } from "./history_suite.ts";
import { finishedRun } from "./history_runs.ts";

const missing = postgresMissing();
if (missing !== undefined) console.warn(`history on PostgreSQL skipped: ${missing}`);

let server: TestPostgres | undefined;
let dir = "";
let runs = { pre: "", cm1: "", scratch: "" };
let count = 0;

/** A new empty database on the test server for each test. */
async function newDb(): Promise<string> {
  const name = `history_${++count}`;
  const admin = openPostgresStore(server!.url);
  try {
    await admin.query(`CREATE DATABASE ${name}`);
  } finally {
    await admin.close();
  }
  return server!.url.replace(/\/postgres$/, `/${name}`);
}

describe.skipIf(missing !== undefined)("PostgreSQL", () => {
  beforeAll(async () => {
    server = await startPostgres();
    dir = await mkdtemp("/tmp/quiver-history-pg-");
    runs = { ...await twoRuns(dir), scratch: await finishedRun(join(dir, "scratch"), 0.7) };
  }, 300_000);
  afterAll(async () => {
    await server?.stop();
    if (dir !== "") await rm(dir, { recursive: true, force: true });
  }, 120_000);

  historySuite("PostgreSQL", newDb, () => runs);

  test("the command line takes a postgres:// database as it takes a file", async () => {
    const db = await newDb();
    for (const [run, build] of [[runs.pre, "pre"], [runs.cm1, "CM1"]]) {
      const added = runQuiver(["history", "add", run, "--db", db, "--build", build]);
      expect(added.code, added.stderr).toBe(0);
    }
    const trend = runQuiver([
      "history",
      "trend",
      "--db",
      db,
      "--target",
      "cabin_leq",
      "--format",
      "csv",
    ]);
    expect(trend.code, trend.stderr).toBe(0);
    const lines = trend.stdout.trim().split("\n");
    expect(lines[0]).toBe("build,value,limit,verdict,unit,run,started");
    expect(lines.slice(1).map((l) => l.split(",")[0] + "," + l.split(",")[3])).toEqual([
      "pre,fail",
      "CM1,pass",
    ]);
  }, 300_000);
});
