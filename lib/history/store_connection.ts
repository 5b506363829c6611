/**
 * The one interface of a history store's database: SQL with numbered
 * parameters (`$1`, `$2`, …) run on SQLite (sqlite_store.ts, a file, no
 * server) or PostgreSQL (postgres_store.ts, a team's server). The history
 * itself (history_store.ts) is written once against it, in SQL both speak.
 *
 * @module
 */

/** A value bound to a parameter or read from a column. */
export type SqlValue = string | number | null;

/** One row read, by column name. */
export type SqlRow = Readonly<Record<string, SqlValue>>;

/** What a history store needs of a database. */
export interface StoreConnection {
  /** `sqlite` or `postgres`: for the few statements the two spell differently. */
  readonly dialect: "sqlite" | "postgres";
  /** Where it is, for messages: the file, or the server's URL without its password. */
  readonly where: string;
  /** Runs a query and returns its rows (none for a statement). */
  query(sql: string, params?: readonly SqlValue[]): Promise<SqlRow[]>;
  /** The names of the tables that exist (in the connection's schema). */
  tableNames(): Promise<string[]>;
  /**
   * Runs `work` in one transaction, committed when it returns and rolled
   * back when it throws; the rows `work` reads stay its own until then.
   */
  transaction<T>(work: (connection: StoreConnection) => Promise<T>): Promise<T>;
  /** Closes the connection. */
  close(): Promise<void>;
}

/**
 * Whether `db` names a PostgreSQL server (`postgres://…` or
 * `postgresql://…`) rather than a SQLite file.
 *
 * @example
 * ```ts
 * import { isServerUrl } from "./store_connection.ts";
 * if (!isServerUrl("postgres://u@127.0.0.1:5432/q") || isServerUrl("history.sqlite")) throw new Error();
 * ```
 */
export function isServerUrl(db: string): boolean {
  return /^postgres(ql)?:\/\//i.test(db);
}

/**
 * A server URL for messages: the password, if any, left out.
 *
 * @example
 * ```ts
 * import { withoutPassword } from "./store_connection.ts";
 * if (withoutPassword("postgres://u:secret@h:5432/d") !== "postgres://u@h:5432/d") throw new Error();
 * ```
 */
export function withoutPassword(url: string): string {
  return url.replace(/^(postgres(?:ql)?:\/\/[^:@/]*):[^@/]*@/i, "$1@");
}
