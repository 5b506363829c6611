/**
 * The history's tests, written once and run against each store: a SQLite
 * file (history_sqlite.test.ts) and a PostgreSQL server
 * (history_postgres.test.ts). `newDb` gives each test an empty database.
 */
import { readFile, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { beforeAll, describe, expect, test } from "vitest";
import { openHistory } from "../../lib/history/history_store.ts";
import { readRunRecord } from "../../lib/history/run_record.ts";
import { openPostgresStore } from "../../lib/history/postgres_store.ts";
import { openSqliteStore } from "../../lib/history/sqlite_store.ts";
import { isServerUrl, type StoreConnection } from "../../lib/history/store_connection.ts";
import { sha256Hex } from "../../lib/io/table_file.ts";
import type { Manifest } from "../../lib/plan/manifest.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { finishedRun, LEQ_LIMIT_DB, sineLeqDb } from "./history_runs.ts";

/** Generous: each test adds runs and reads results on a loaded 2-core machine. */
export const HISTORY_TIMEOUT_MS = 240_000;

async function rawConnection(db: string): Promise<StoreConnection> {
  return isServerUrl(db) ? openPostgresStore(db) : await openSqliteStore(db);
}

/** Two runs of the same plan, builds "pre" (1 Pa r.m.s.) and "CM1" (0.5 Pa r.m.s.), in `dir`. */
export async function twoRuns(dir: string): Promise<{ pre: string; cm1: string }> {
  return {
    pre: await finishedRun(join(dir, "pre"), 1),
    cm1: await finishedRun(join(dir, "cm1"), 0.5),
  };
}

/** The suite, against the databases `newDb` gives; `runs` are made once by the caller. */
export function historySuite(
  store: string,
  newDb: () => Promise<string>,
  runs: () => { pre: string; cm1: string; scratch: string },
): void {
  describe(`history on ${store}`, () => {
    let pre: string, cm1: string;
    beforeAll(() => {
      ({ pre, cm1 } = runs());
    });

    test("runs are listed and trended in order of addition, with their values", async () => {
      const db = await newDb();
      const history = await openHistory(db);
      try {
        // "pre" sorts after "CM1" by name: the order shown must be that of addition.
        expect(await history.add(await readRunRecord(pre), { build: "pre" })).toEqual({
          seq: 1,
          added: true,
        });
        expect(
          await history.add(await readRunRecord(cm1), { build: "CM1", vehicle: "Tamarack E5" }),
        ).toEqual({ seq: 2, added: true });
        const runs = await history.list();
        expect(runs.map((r) => [r.seq, r.build, r.vehicle])).toEqual([
          [1, "pre", null],
          [2, "CM1", "Tamarack E5"],
        ]);
        // One target checked (pre fails at 94 dB, CM1 passes at 88 dB), one not checked.
        expect(runs.map((r) => [r.targetsPassed, r.targets])).toEqual([[0, 2], [1, 2]]);
        const trend = await history.trend("cabin_leq");
        expect(trend.map((p) => [p.build, p.verdict, p.limit, p.unit])).toEqual([
          ["pre", "fail", LEQ_LIMIT_DB, "dB"],
          ["CM1", "pass", LEQ_LIMIT_DB, "dB"],
        ]);
        // ISO 1683 (20 µPa): 1 Pa r.m.s. is 93.98 dB, half of it 6.02 dB less; the Leq of
        // whole cycles of a sine is exact, the digital path leaves well under 0.05 dB.
        assertClose(trend[0].value!, sineLeqDb(1), { absolute: 0.05, relative: 0 });
        assertClose(trend[1].value!, sineLeqDb(0.5), { absolute: 0.05, relative: 0 });
        const unchecked = await history.trend("rear_leq");
        expect(unchecked.map((p) => [p.verdict, p.value, p.limit])).toEqual([
          ["not_checked", null, null],
          ["not_checked", null, null],
        ]);
        // The step's key values: the level analysis's quantities (its descriptor), Leq and Lmax.
        const steps = await history.connection.query(
          "SELECT quantity, value FROM step_values s JOIN runs r ON r.run_key = s.run_key WHERE r.build = $1 ORDER BY quantity",
          ["CM1"],
        );
        expect(steps.map((s) => s.quantity)).toEqual(["leq_db", "lmax_db"]);
        assertClose(steps[0].value as number, sineLeqDb(0.5), { absolute: 0.05, relative: 0 });
        // Fast (τ = 0.125 s) on a 250 Hz sine: the squared signal's ripple is ≪ 0.1 dB
        // (first-order smoothing of 500 Hz, IEC 61672-1 time weighting); Lmax ≥ Leq.
        expect(steps[1].value as number).toBeGreaterThanOrEqual((steps[0].value as number) - 0.01);
        assertClose(steps[1].value as number, sineLeqDb(0.5), { absolute: 0.1, relative: 0 });
        const plan = await history.connection.query("SELECT plan_text, plan_sha256 FROM runs");
        // The plan kept whole: its text hashes to the hash the manifest recorded.
        expect(sha256Hex(new TextEncoder().encode(String(plan[0].plan_text)))).toBe(
          plan[0].plan_sha256,
        );
      } finally {
        await history.close();
      }
    }, HISTORY_TIMEOUT_MS);

    test("adding a run again changes nothing; under another build it is refused", async () => {
      const db = await newDb();
      const history = await openHistory(db);
      try {
        await history.add(await readRunRecord(pre), { build: "pre" });
        const count = async () =>
          (await history.connection.query("SELECT target_id FROM target_values")).length;
        expect(await count()).toBe(2);
        expect(await history.add(await readRunRecord(pre), { build: "pre" })).toEqual({
          seq: 1,
          added: false,
        });
        expect((await history.list()).length).toBe(1);
        expect(await count()).toBe(2);
        await expect(history.add(await readRunRecord(pre), { build: "B2" })).rejects.toThrow(
          /already in the history as run 1, with build "pre"/,
        );
      } finally {
        await history.close();
      }
    }, HISTORY_TIMEOUT_MS);

    test("a run whose files changed is refused, naming the file", async () => {
      const { scratch } = runs();
      const result = join(scratch, "cabin_level.json");
      const manifestPath = join(scratch, "manifest.json");
      const original = await readFile(result);
      const originalManifest = await readFile(manifestPath);
      const db = await newDb();
      const history = await openHistory(db);
      try {
        await history.add(await readRunRecord(scratch), { build: "B2" });
        // 1. A result edited after the run: its hash no longer matches the manifest.
        await writeFile(result, `${new TextDecoder().decode(original)} `);
        await expect(readRunRecord(scratch)).rejects.toThrow(
          /cabin_level\.json changed since the run/,
        );
        // 2. The same values written anew and the manifest's record made to match it: the run
        // still differs from what the history stored when it was added.
        const rewritten = JSON.stringify(JSON.parse(new TextDecoder().decode(original)), null, 1);
        await writeFile(result, rewritten);
        const manifest = JSON.parse(new TextDecoder().decode(originalManifest)) as Manifest;
        const bytes = new TextEncoder().encode(rewritten);
        manifest.steps[0].outputs.out = {
          ...manifest.steps[0].outputs.out,
          bytes: bytes.length,
          sha256: sha256Hex(bytes),
        };
        await writeFile(manifestPath, JSON.stringify(manifest, null, 2));
        const record = await readRunRecord(scratch);
        await expect(history.add(record, { build: "B2" })).rejects.toThrow(
          /cabin_level\.json changed since run 1 was added to the history/,
        );
        expect((await history.list()).length).toBe(1);
      } finally {
        await writeFile(result, original);
        await writeFile(manifestPath, originalManifest);
        await history.close();
      }
    }, HISTORY_TIMEOUT_MS);

    test(
      "a version-1 database made by hand is migrated, its rows kept and given verdicts",
      async () => {
        const db = await newDb();
        const raw = await rawConnection(db);
        try {
          // The version-1 schema as it was written, by hand (not from migrations.ts).
          for (
            const sql of [
              "CREATE TABLE schema_version (version INTEGER PRIMARY KEY, summary TEXT NOT NULL, applied TEXT NOT NULL)",
              "INSERT INTO schema_version VALUES (1, 'runs and target values', '2026-01-10T08:00:00Z')",
              `CREATE TABLE runs (run_key TEXT PRIMARY KEY, seq INTEGER NOT NULL UNIQUE,
              build TEXT NOT NULL, plan_title TEXT NOT NULL, plan_sha256 TEXT NOT NULL,
              plan_text TEXT NOT NULL, quiver_version TEXT NOT NULL, started TEXT NOT NULL,
              finished TEXT, status TEXT NOT NULL, added TEXT NOT NULL)`,
              `CREATE TABLE target_values (run_key TEXT NOT NULL REFERENCES runs (run_key),
              target_id TEXT NOT NULL, description TEXT NOT NULL, status TEXT NOT NULL,
              pass INTEGER, value DOUBLE PRECISION, limit_value DOUBLE PRECISION,
              margin DOUBLE PRECISION, unit TEXT, reason TEXT, PRIMARY KEY (run_key, target_id))`,
              `INSERT INTO runs VALUES ('k0', 1, 'B0', 'old plan', 'ab', '{}', '0.0.9',
              '2026-01-09T08:00:00Z', '2026-01-09T08:10:00Z', 'ok', '2026-01-10T08:00:00Z')`,
              `INSERT INTO target_values VALUES ('k0', 'cabin_leq', 'cabin Leq', 'checked', 1,
              86.5, 90, 3.5, 'dB', NULL)`,
              `INSERT INTO target_values VALUES ('k0', 'rear_leq', 'rear Leq', 'not_checked', NULL,
              NULL, NULL, NULL, NULL, 'no channel')`,
              `INSERT INTO target_values VALUES ('k0', 'seat_aw', 'seat a_w', 'checked', 0,
              0.41, 0.315, -0.095, 'm/s^2', NULL)`,
            ]
          ) await raw.query(sql);
        } finally {
          await raw.close();
        }
        const history = await openHistory(db);
        try {
          const versions = await history.connection.query(
            "SELECT version FROM schema_version ORDER BY version",
          );
          expect(versions.map((v) => v.version)).toEqual([1, 2]);
          // The rows of version 1 are kept; the verdict comes from their status and pass.
          const verdicts = await history.connection.query(
            "SELECT target_id, verdict FROM target_values ORDER BY target_id",
          );
          expect(verdicts.map((v) => [v.target_id, v.verdict])).toEqual([
            ["cabin_leq", "pass"],
            ["rear_leq", "not_checked"],
            ["seat_aw", "fail"],
          ]);
          expect((await history.list()).map((r) => [r.seq, r.build, r.vehicle, r.note])).toEqual([
            [1, "B0", null, null],
          ]);
          // A run added after the migration follows the old one.
          await history.add(await readRunRecord(cm1), {
            build: "CM1",
            note: "after the migration",
          });
          const trend = await history.trend("cabin_leq");
          expect(trend.map((p) => [p.build, p.value !== null, p.verdict])).toEqual([
            ["B0", true, "pass"],
            ["CM1", true, "pass"],
          ]);
          expect(trend[0].value).toBe(86.5);
        } finally {
          await history.close();
        }
        // Opening again migrates nothing more.
        const again = await openHistory(db);
        try {
          expect((await again.connection.query("SELECT version FROM schema_version")).length).toBe(
            2,
          );
        } finally {
          await again.close();
        }
      },
      HISTORY_TIMEOUT_MS,
    );

    test("a database of a newer schema is refused, and an unknown target named", async () => {
      const db = await newDb();
      const history = await openHistory(db);
      try {
        await history.add(await readRunRecord(pre), { build: "pre" });
        await expect(history.trend("cabin_lq")).rejects.toThrow(
          /no run in the history has a target "cabin_lq"; did you mean "cabin_leq"\?/,
        );
        await history.connection.query(
          "INSERT INTO schema_version (version, summary, applied) VALUES (99, 'future', 'x')",
        );
      } finally {
        await history.close();
      }
      await expect(openHistory(db)).rejects.toThrow(
        /schema version 99, newer than this quiver's 2/,
      );
    }, HISTORY_TIMEOUT_MS);
  });
}
