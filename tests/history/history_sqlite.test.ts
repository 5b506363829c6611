/**
 * The history on a SQLite file (Deno's node:sqlite): the shared suite.
 */
import { mkdtemp, rm } from "node:fs/promises";
import { join } from "node:path";
import { afterAll, beforeAll } from "vitest";
import { historySuite, twoRuns } from "./history_suite.ts";
import { finishedRun } from "./history_runs.ts";

let dir = "";
let runs = { pre: "", cm1: "", scratch: "" };
let count = 0;

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-history-sqlite-");
  runs = { ...await twoRuns(dir), scratch: await finishedRun(join(dir, "scratch"), 0.7) };
}, 240_000);
afterAll(async () => {
  if (dir !== "") await rm(dir, { recursive: true, force: true });
});

historySuite("SQLite", () => Promise.resolve(join(dir, `history_${++count}.sqlite`)), () => runs);
