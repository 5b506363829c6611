/**
 * The history of runs, written once against {@linkcode StoreConnection}:
 * a SQLite file or a PostgreSQL server hold the same schema (migrations.ts)
 * and answer the same SQL. Runs are numbered in order of addition; adding a
 * run twice keeps the first, and a run whose files differ from those it was
 * added with is refused, naming the file.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { didYouMeanClause } from "../nearest_name.ts";
import { migrate } from "./migrations.ts";
import type { RunRecord } from "./run_record.ts";
import { openSqliteStore } from "./sqlite_store.ts";
import { isServerUrl, type SqlRow, type StoreConnection } from "./store_connection.ts";

/** What a run is added under. */
export interface RunLabels {
  /** The build (prototype level, software release, countermeasure), e.g. `B2`. */
  readonly build: string;
  /** The vehicle. Default none. */
  readonly vehicle?: string;
  /** A note. Default none. */
  readonly note?: string;
}

/** A recorded run, as listed. */
export interface RunSummary {
  /** Its number, in order of addition (1 first). */
  readonly seq: number;
  readonly build: string;
  readonly vehicle: string | null;
  readonly note: string | null;
  readonly planTitle: string;
  readonly planSha256: string;
  readonly quiverVersion: string;
  readonly started: string;
  readonly status: string;
  readonly added: string;
  readonly targetsPassed: number;
  readonly targets: number;
}

/** One run's outcome of one target, for a trend. */
export interface TrendPoint {
  readonly build: string;
  readonly value: number | null;
  readonly limit: number | null;
  readonly verdict: "pass" | "fail" | "not_checked";
  readonly unit: string | null;
  readonly seq: number;
  readonly started: string;
  readonly description: string;
}

/** Options of {@linkcode openHistory}. */
export interface OpenHistoryOptions {
  /** Refuse a SQLite file that does not exist yet (reading commands). Default false. */
  readonly mustExist?: boolean;
}

const text = (v: unknown): string => String(v);
const textOrNull = (v: unknown): string | null => v === null || v === undefined ? null : String(v);
const numberOrNull = (v: unknown): number | null => typeof v === "number" ? v : null;

/**
 * The history of runs in one database.
 *
 * @example
 * ```ts
 * import { openHistory } from "./history_store.ts";
 * const run = (key: string, value: number) => ({
 *   key, planTitle: "road", planSha256: "ab", planText: "{}", quiverVersion: "0.1.0",
 *   started: "2026-01-01T00:00:00Z", finished: null, status: "ok", steps: [], files: [],
 *   targets: [{ id: "leq", description: "Leq ≤ 70 dB", status: "checked", verdict: value <= 70 ? "pass" as const : "fail" as const,
 *     value, limit: 70, margin: 70 - value, unit: "dB", reason: null }],
 * });
 * const history = await openHistory(":memory:");
 * await history.add(run("k1", 72.5), { build: "B1" });
 * await history.add(run("k2", 68.1), { build: "B2" });
 * if ((await history.add(run("k2", 68.1), { build: "B2" })).added) throw new Error(); // once
 * const trend = await history.trend("leq");
 * if (trend.map((p) => `${p.build}:${p.verdict}`).join() !== "B1:fail,B2:pass") throw new Error();
 * await history.close();
 * ```
 */
export class HistoryStore {
  /** The database connection (for the tests' checks of the schema). */
  readonly connection: StoreConnection;

  /** A store on an open connection whose schema is current (use {@linkcode openHistory}). */
  constructor(connection: StoreConnection) {
    this.connection = connection;
  }

  /**
   * Adds a run. Returns its number and whether it was new: a run already
   * recorded is left as it was (adding is idempotent).
   *
   * @throws {QuiverError} for a run recorded before whose files differ now
   * (naming the file), or that was recorded under another build, vehicle or note.
   */
  async add(run: RunRecord, labels: RunLabels): Promise<{ seq: number; added: boolean }> {
    return await this.connection.transaction(async (db) => {
      // One writer at a time: the run's number is the next after the last.
      if (db.dialect === "postgres") await db.query("LOCK TABLE runs IN SHARE ROW EXCLUSIVE MODE");
      const existing = await db.query(
        "SELECT seq, build, vehicle, note FROM runs WHERE run_key = $1",
        [run.key],
      );
      if (existing.length > 0) {
        await this.sameAsRecorded(db, run, labels, existing[0]);
        return { seq: Number(existing[0].seq), added: false };
      }
      const last = await db.query("SELECT MAX(seq) AS seq FROM runs");
      const seq = (numberOrNull(last[0]?.seq) ?? 0) + 1;
      await db.query(
        `INSERT INTO runs (run_key, seq, build, vehicle, note, plan_title, plan_sha256, plan_text,
          quiver_version, started, finished, status, added)
         VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13)`,
        [
          run.key,
          seq,
          labels.build,
          labels.vehicle ?? null,
          labels.note ?? null,
          run.planTitle,
          run.planSha256,
          run.planText,
          run.quiverVersion,
          run.started,
          run.finished,
          run.status,
          new Date().toISOString(),
        ],
      );
      for (const t of run.targets) {
        await db.query(
          `INSERT INTO target_values (run_key, target_id, description, status, pass, verdict,
            value, limit_value, margin, unit, reason)
           VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11)`,
          [
            run.key,
            t.id,
            t.description,
            t.status,
            t.verdict === "not_checked" ? null : t.verdict === "pass" ? 1 : 0,
            t.verdict,
            t.value,
            t.limit,
            t.margin,
            t.unit,
            t.reason,
          ],
        );
      }
      for (const s of run.steps) {
        await db.query(
          `INSERT INTO step_values (run_key, step_id, command, quantity, channel, mode, value, basis)
           VALUES ($1, $2, $3, $4, $5, $6, $7, $8)`,
          [run.key, s.stepId, s.command, s.quantity, s.channel, s.mode, s.value, s.basis ?? null],
        );
      }
      for (const f of run.files) {
        await db.query(
          "INSERT INTO run_files (run_key, path, bytes, sha256) VALUES ($1, $2, $3, $4)",
          [run.key, f.path, f.bytes, f.sha256],
        );
      }
      return { seq, added: true };
    });
  }

  private async sameAsRecorded(
    db: StoreConnection,
    run: RunRecord,
    labels: RunLabels,
    stored: SqlRow,
  ): Promise<void> {
    const recorded = await db.query(
      "SELECT path, bytes, sha256 FROM run_files WHERE run_key = $1 ORDER BY path",
      [run.key],
    );
    const now = new Map(run.files.map((f) => [f.path, f]));
    for (const r of recorded) {
      const f = now.get(text(r.path));
      if (f === undefined || f.sha256 !== r.sha256 || f.bytes !== Number(r.bytes)) {
        throw new QuiverError(
          `${r.path} changed since run ${stored.seq} was added to the history (its hash differs from the stored record): refused`,
          { file: this.connection.where },
        );
      }
    }
    const differs: string[] = [];
    if (stored.build !== labels.build) differs.push(`build "${stored.build}"`);
    if (labels.vehicle !== undefined && stored.vehicle !== labels.vehicle) {
      differs.push(`vehicle "${stored.vehicle ?? ""}"`);
    }
    if (labels.note !== undefined && stored.note !== labels.note) {
      differs.push(`note "${stored.note ?? ""}"`);
    }
    if (differs.length > 0) {
      throw new QuiverError(
        `this run is already in the history as run ${stored.seq}, with ${
          differs.join(", ")
        }: a run is recorded once`,
        { file: this.connection.where },
        "usage",
      );
    }
  }

  /** Every run, in order of addition. */
  async list(): Promise<RunSummary[]> {
    const rows = await this.connection.query(
      `SELECT r.seq, r.build, r.vehicle, r.note, r.plan_title, r.plan_sha256, r.quiver_version,
         r.started, r.status, r.added,
         (SELECT COUNT(*) FROM target_values t WHERE t.run_key = r.run_key AND t.verdict = 'pass')
           AS passed,
         (SELECT COUNT(*) FROM target_values t WHERE t.run_key = r.run_key) AS targets
       FROM runs r ORDER BY r.seq`,
    );
    return rows.map((r) => ({
      seq: Number(r.seq),
      build: text(r.build),
      vehicle: textOrNull(r.vehicle),
      note: textOrNull(r.note),
      planTitle: text(r.plan_title),
      planSha256: text(r.plan_sha256),
      quiverVersion: text(r.quiver_version),
      started: text(r.started),
      status: text(r.status),
      added: text(r.added),
      // COUNT is a 64-bit integer, which the PostgreSQL client gives as text.
      targetsPassed: Number(r.passed),
      targets: Number(r.targets),
    }));
  }

  /** The target ids recorded, in order of first appearance. */
  async targetIds(): Promise<string[]> {
    const rows = await this.connection.query(
      `SELECT t.target_id, MIN(r.seq) AS first FROM target_values t
       JOIN runs r ON r.run_key = t.run_key GROUP BY t.target_id ORDER BY first, t.target_id`,
    );
    return rows.map((r) => text(r.target_id));
  }

  /**
   * One target over the runs that checked it, in order of addition.
   *
   * @throws {QuiverError} (usage) for a target no run recorded, with the nearest id.
   */
  async trend(targetId: string): Promise<TrendPoint[]> {
    const rows = await this.connection.query(
      `SELECT r.build, t.value, t.limit_value, t.verdict, t.unit, r.seq, r.started, t.description
       FROM target_values t JOIN runs r ON r.run_key = t.run_key
       WHERE t.target_id = $1 ORDER BY r.seq`,
      [targetId],
    );
    if (rows.length === 0) {
      const known = await this.targetIds();
      throw new QuiverError(
        `no run in the history has a target "${targetId}"${
          didYouMeanClause(targetId, known)
        }; recorded: ${known.length === 0 ? "none" : known.join(", ")}`,
        { file: this.connection.where },
        "usage",
      );
    }
    return rows.map((r) => ({
      build: text(r.build),
      value: numberOrNull(r.value),
      limit: numberOrNull(r.limit_value),
      verdict: r.verdict === "pass" || r.verdict === "fail" ? r.verdict : "not_checked",
      unit: textOrNull(r.unit),
      seq: Number(r.seq),
      started: text(r.started),
      description: text(r.description),
    }));
  }

  /** Closes the database. */
  async close(): Promise<void> {
    await this.connection.close();
  }
}

/**
 * Opens the history `db` (a SQLite file, or `postgres://…`) and brings its
 * schema up to date.
 *
 * @example
 * ```ts
 * import { openHistory } from "./history_store.ts";
 * const history = await openHistory(":memory:");
 * if ((await history.list()).length !== 0) throw new Error();
 * await history.close();
 * ```
 */
export async function openHistory(
  db: string,
  options: OpenHistoryOptions = {},
): Promise<HistoryStore> {
  // The PostgreSQL client is loaded only for a server: a SQLite history never loads it.
  const connection = isServerUrl(db)
    ? (await import("./postgres_store.ts")).openPostgresStore(db)
    : await openSqliteStore(db, options.mustExist === true ? { mustExist: true } : {});
  try {
    await migrate(connection);
  } catch (error) {
    await connection.close();
    throw error;
  }
  return new HistoryStore(connection);
}

/**
 * Refuses an empty build label or one with control characters (it leads every trend line).
 *
 * @example
 * ```ts
 * import { checkLabel } from "./history_store.ts";
 * if (checkLabel("B2", "--build") !== "B2") throw new Error();
 * let said = "";
 * try { checkLabel(" ", "--build"); } catch (e) { said = (e as Error).message; }
 * if (!said.includes("--build must be printable")) throw new Error(said);
 * ```
 */
export function checkLabel(value: string, option: string): string {
  // deno-lint-ignore no-control-regex
  if (value.trim() === "" || /[\u0000-\u001f\u007f]/.test(value)) {
    throw new QuiverError(`${option} must be printable text, not empty`, {}, "usage");
  }
  return value;
}
