/**
 * The history store on a PostgreSQL server, for a team sharing one history:
 * the same schema and SQL as the SQLite file (store_connection.ts), through
 * the npm `postgres` client (Unlicense, no dependencies). One connection per
 * store; parameters are sent apart from the SQL, never spliced into it.
 *
 * @module
 */
import postgres from "npm:postgres@4.2.0";
import { QuiverError } from "../errors.ts";
import {
  type SqlRow,
  type SqlValue,
  type StoreConnection,
  withoutPassword,
} from "./store_connection.ts";

/** How long to wait for the server to answer a connection, seconds (a loaded machine is slow). */
const CONNECT_TIMEOUT_S = 60;

type Client = postgres.Sql | postgres.TransactionSql;

function rowsOf(raw: readonly Record<string, unknown>[], where: string): SqlRow[] {
  return raw.map((r) => {
    const row: Record<string, SqlValue> = {};
    for (const [name, value] of Object.entries(r)) {
      if (value === null || typeof value === "string" || typeof value === "number") {
        row[name] = value;
      } else {
        throw new QuiverError(`column ${name} holds a value quiver does not write`, {
          file: where,
        });
      }
    }
    return row;
  });
}

function refused(error: unknown, where: string): QuiverError {
  if (error instanceof QuiverError) return error;
  return new QuiverError(`the PostgreSQL server refused or failed: ${(error as Error).message}`, {
    file: where,
  });
}

function connectionOf(
  client: Client,
  where: string,
  root: postgres.Sql | undefined,
): StoreConnection {
  const connection: StoreConnection = {
    dialect: "postgres",
    where,
    async query(sql, params = []) {
      try {
        const raw = await client.unsafe(sql, params as SqlValue[]);
        return rowsOf(raw as unknown as Record<string, unknown>[], where);
      } catch (error) {
        throw refused(error, where);
      }
    },
    async tableNames() {
      const rows = await connection.query(
        "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = current_schema()",
      );
      return rows.map((r) => String(r.name));
    },
    async transaction(work) {
      if (root === undefined) throw new Error("transactions do not nest");
      let outcome: { value: Awaited<ReturnType<typeof work>> } | undefined;
      try {
        await root.begin(async (tx) => {
          outcome = { value: await work(connectionOf(tx, where, undefined)) };
        });
      } catch (error) {
        throw refused(error, where);
      }
      return outcome!.value;
    },
    async close() {
      await root?.end({ timeout: 5 });
    },
  };
  return connection;
}

/**
 * Connects to the history store on a PostgreSQL server (`postgres://…`).
 * Nothing is sent until the first query; an unreachable server is named then.
 *
 * @example
 * ```ts
 * import { openPostgresStore } from "./postgres_store.ts";
 * const db = openPostgresStore("postgres://quiver:pw@127.0.0.1:1/none");
 * if (db.dialect !== "postgres" || db.where.includes("pw")) throw new Error();
 * await db.close();
 * ```
 */
export function openPostgresStore(url: string): StoreConnection {
  const where = withoutPassword(url);
  const sql = postgres(url, {
    max: 1,
    connect_timeout: CONNECT_TIMEOUT_S,
    idle_timeout: 0,
    onnotice: () => {},
    // Values come back as the server's text for types quiver does not use; numbers as numbers.
    types: {},
  });
  return connectionOf(sql, where, sql);
}
