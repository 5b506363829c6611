/**
 * The history store's schema, as the migrations that build it: version 1
 * (runs and target values) and version 2 (vehicle and note, the step values,
 * the files a run was added with, and each target's verdict in one word).
 * A new database runs them all; an older one runs those past its version,
 * in one transaction, and `schema_version` records each. The SQL is what
 * SQLite and PostgreSQL both accept (types by name: TEXT, INTEGER, DOUBLE
 * PRECISION; no engine's own extensions).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { StoreConnection } from "./store_connection.ts";

/** One step of the schema: the statements that take a database from `version - 1` to `version`. */
export interface Migration {
  readonly version: number;
  /** What it adds, in words (kept in `schema_version`). */
  readonly summary: string;
  readonly statements: readonly string[];
}

/**
 * The table that records the schema's version, one row per migration applied.
 *
 * @example
 * ```ts
 * import { SCHEMA_VERSION_TABLE } from "./migrations.ts";
 * if (!SCHEMA_VERSION_TABLE.startsWith("CREATE TABLE schema_version")) throw new Error();
 * ```
 */
export const SCHEMA_VERSION_TABLE =
  "CREATE TABLE schema_version (version INTEGER PRIMARY KEY, summary TEXT NOT NULL, applied TEXT NOT NULL)";

/**
 * Version 1: runs, and each run's target outcomes.
 *
 * @example
 * ```ts
 * import { SCHEMA_V1 } from "./migrations.ts";
 * if (SCHEMA_V1.length !== 2 || !SCHEMA_V1[1].includes("target_values")) throw new Error();
 * ```
 */
export const SCHEMA_V1: readonly string[] = [
  `CREATE TABLE runs (
    run_key TEXT PRIMARY KEY,
    seq INTEGER NOT NULL UNIQUE,
    build TEXT NOT NULL,
    plan_title TEXT NOT NULL,
    plan_sha256 TEXT NOT NULL,
    plan_text TEXT NOT NULL,
    quiver_version TEXT NOT NULL,
    started TEXT NOT NULL,
    finished TEXT,
    status TEXT NOT NULL,
    added TEXT NOT NULL
  )`,
  `CREATE TABLE target_values (
    run_key TEXT NOT NULL REFERENCES runs (run_key),
    target_id TEXT NOT NULL,
    description TEXT NOT NULL,
    status TEXT NOT NULL,
    pass INTEGER,
    value DOUBLE PRECISION,
    limit_value DOUBLE PRECISION,
    margin DOUBLE PRECISION,
    unit TEXT,
    reason TEXT,
    PRIMARY KEY (run_key, target_id)
  )`,
];

/**
 * Every migration, in order; the last one's version is the schema's.
 *
 * @example
 * ```ts
 * import { MIGRATIONS, SCHEMA_VERSION } from "./migrations.ts";
 * if (MIGRATIONS.map((m) => m.version).join() !== "1,2" || SCHEMA_VERSION !== 2) throw new Error();
 * ```
 */
export const MIGRATIONS: readonly Migration[] = [
  { version: 1, summary: "runs and target values", statements: SCHEMA_V1 },
  {
    version: 2,
    summary: "vehicle and note, step values, run files, verdicts",
    statements: [
      "ALTER TABLE runs ADD COLUMN vehicle TEXT",
      "ALTER TABLE runs ADD COLUMN note TEXT",
      "ALTER TABLE target_values ADD COLUMN verdict TEXT",
      // The verdict in one word, for the rows version 1 kept as status and pass.
      `UPDATE target_values SET verdict = CASE
        WHEN status <> 'checked' THEN 'not_checked'
        WHEN pass = 1 THEN 'pass'
        ELSE 'fail' END`,
      `CREATE TABLE step_values (
        run_key TEXT NOT NULL REFERENCES runs (run_key),
        step_id TEXT NOT NULL,
        command TEXT NOT NULL,
        quantity TEXT NOT NULL,
        channel TEXT NOT NULL,
        mode INTEGER NOT NULL,
        value DOUBLE PRECISION NOT NULL,
        basis TEXT,
        PRIMARY KEY (run_key, step_id, quantity, channel, mode)
      )`,
      `CREATE TABLE run_files (
        run_key TEXT NOT NULL REFERENCES runs (run_key),
        path TEXT NOT NULL,
        bytes INTEGER NOT NULL,
        sha256 TEXT NOT NULL,
        PRIMARY KEY (run_key, path)
      )`,
    ],
  },
];

/**
 * The schema version this quiver writes.
 *
 * @example
 * ```ts
 * import { SCHEMA_VERSION } from "./migrations.ts";
 * if (!Number.isInteger(SCHEMA_VERSION) || SCHEMA_VERSION < 1) throw new Error();
 * ```
 */
export const SCHEMA_VERSION: number = MIGRATIONS[MIGRATIONS.length - 1].version;

/**
 * The version a database holds: 0 for one without quiver's tables.
 *
 * @example
 * ```ts
 * import { migrate, schemaVersion } from "./migrations.ts";
 * import { openSqliteStore } from "./sqlite_store.ts";
 * const db = await openSqliteStore(":memory:");
 * if (await schemaVersion(db) !== 0) throw new Error();
 * const { from, to } = await migrate(db);
 * if (from !== 0 || to !== 2 || await schemaVersion(db) !== 2) throw new Error();
 * await db.close();
 * ```
 */
export async function schemaVersion(connection: StoreConnection): Promise<number> {
  const tables = await connection.tableNames();
  if (!tables.includes("schema_version")) {
    if (tables.includes("runs") || tables.includes("target_values")) {
      throw new QuiverError(
        "it has tables named runs or target_values but no schema_version table: not a quiver history database",
        { file: connection.where },
      );
    }
    return 0;
  }
  const rows = await connection.query("SELECT MAX(version) AS version FROM schema_version");
  const version = rows[0]?.version;
  return typeof version === "number" ? version : 0;
}

/**
 * Brings a database to {@linkcode SCHEMA_VERSION}: the migrations past its
 * version, in one transaction (a failed one leaves it as it was). Returns
 * the versions before and after.
 *
 * @throws {QuiverError} for a database of a newer schema than this quiver knows.
 *
 * @example
 * ```ts
 * import { migrate, SCHEMA_V1 } from "./migrations.ts";
 * import { openSqliteStore } from "./sqlite_store.ts";
 * const db = await openSqliteStore(":memory:");
 * // Version 1 only, then the rest: the runs table gains its vehicle column.
 * await migrate(db, [{ version: 1, summary: "v1", statements: SCHEMA_V1 }]);
 * if ((await migrate(db)).from !== 1) throw new Error();
 * await db.query("SELECT vehicle FROM runs");
 * await db.close();
 * ```
 */
export async function migrate(
  connection: StoreConnection,
  migrations: readonly Migration[] = MIGRATIONS,
): Promise<{ from: number; to: number }> {
  return await connection.transaction(async (tx) => {
    const from = await schemaVersion(tx);
    const latest = migrations[migrations.length - 1].version;
    if (from > latest) {
      throw new QuiverError(
        `the history database has schema version ${from}, newer than this quiver's ${latest}: use a newer quiver`,
        { file: connection.where },
      );
    }
    if (from === 0) await tx.query(SCHEMA_VERSION_TABLE);
    for (const m of migrations.filter((m) => m.version > from)) {
      for (const statement of m.statements) await tx.query(statement);
      await tx.query(
        "INSERT INTO schema_version (version, summary, applied) VALUES ($1, $2, $3)",
        [m.version, m.summary, new Date().toISOString()],
      );
    }
    return { from, to: latest };
  });
}
