/**
 * The history store in one SQLite file, through Deno's `node:sqlite`
 * (`DatabaseSync`): nothing to install, no server. Parameters `$1`, `$2`, …
 * become SQLite's numbered `?1`, `?2`, … .
 *
 * @module
 */
import { existsSync } from "node:fs";
import { DatabaseSync } from "node:sqlite";
import { QuiverError } from "../errors.ts";
import { assertRegularFile } from "../io/file_kinds.ts";
import type { SqlRow, SqlValue, StoreConnection } from "./store_connection.ts";

/** How long a write waits for another process's write to end, ms: a lock is no error to a user. */
const BUSY_TIMEOUT_MS = 60_000;

/** Options of {@linkcode openSqliteStore}. */
export interface SqliteStoreOptions {
  /** Refuse a file that does not exist yet, instead of creating it. Default false. */
  readonly mustExist?: boolean;
}

function rowOf(raw: Record<string, unknown>, where: string): SqlRow {
  const row: Record<string, SqlValue> = {};
  for (const [name, value] of Object.entries(raw)) {
    if (typeof value === "bigint") row[name] = Number(value);
    else if (value === null || typeof value === "string" || typeof value === "number") {
      row[name] = value;
    } else {
      throw new QuiverError(`column ${name} holds a value quiver does not write`, { file: where });
    }
  }
  return row;
}

/**
 * Opens (or creates) a SQLite history file.
 *
 * @throws {QuiverError} for a path that is no regular file, a file that is
 * not SQLite, or (with `mustExist`) a missing file.
 *
 * @example
 * ```ts
 * import { openSqliteStore } from "./sqlite_store.ts";
 * const db = await openSqliteStore(":memory:");
 * await db.query("CREATE TABLE t (a INTEGER, b TEXT)");
 * await db.query("INSERT INTO t VALUES ($1, $2)", [3, "x"]);
 * const rows = await db.query("SELECT a, b FROM t WHERE a = $1", [3]);
 * if (rows.length !== 1 || rows[0].b !== "x" || !(await db.tableNames()).includes("t")) throw new Error();
 * await db.close();
 * ```
 */
export async function openSqliteStore(
  path: string,
  options: SqliteStoreOptions = {},
): Promise<StoreConnection> {
  if (path !== ":memory:") {
    assertRegularFile(path, "history database");
    if (options.mustExist === true && !existsSync(path)) {
      throw new QuiverError(
        "no history database here (quiver history add creates one)",
        { file: path },
        "usage",
      );
    }
  }
  let db: DatabaseSync;
  try {
    db = new DatabaseSync(path);
    db.exec(`PRAGMA busy_timeout = ${BUSY_TIMEOUT_MS}`);
    db.exec("PRAGMA foreign_keys = ON");
    // Reading the schema is the first touch of the file: a file that is not SQLite fails here.
    db.prepare("SELECT name FROM sqlite_master LIMIT 1").all();
  } catch (error) {
    throw new QuiverError(
      `cannot open it as a SQLite history database: ${(error as Error).message}`,
      { file: path },
    );
  }
  let inTransaction = false;
  const connection: StoreConnection = {
    dialect: "sqlite",
    where: path,
    query(sql, params = []) {
      try {
        const statement = db.prepare(sql.replace(/\$(\d+)/g, "?$1"));
        return Promise.resolve(statement.all(...params).map((r) => rowOf(r, path)));
      } catch (error) {
        if (error instanceof QuiverError) return Promise.reject(error);
        return Promise.reject(
          new QuiverError(`the database refused a statement: ${(error as Error).message}`, {
            file: path,
          }),
        );
      }
    },
    tableNames() {
      const rows = db.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all();
      return Promise.resolve(rows.map((r) => String(r.name)));
    },
    async transaction(work) {
      if (inTransaction) throw new Error("transactions do not nest");
      inTransaction = true;
      // IMMEDIATE: the write lock is taken at the start, so two writers queue instead of failing.
      db.exec("BEGIN IMMEDIATE");
      try {
        const result = await work(connection);
        db.exec("COMMIT");
        return result;
      } catch (error) {
        db.exec("ROLLBACK");
        throw error;
      } finally {
        inTransaction = false;
      }
    },
    close() {
      db.close();
      return Promise.resolve();
    },
  };
  return await Promise.resolve(connection);
}
