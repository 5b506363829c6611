/**
 * The history's listings as text (aligned columns for a terminal), CSV
 * (full precision, empty cells for values not checked, spreadsheet formulas
 * neutralised) or JSON (null for values not checked).
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import { neutraliseFormula } from "../io/table.ts";
import type { RunSummary, TrendPoint } from "./history_store.ts";

/**
 * The formats of `history list` and `history trend`.
 *
 * @example
 * ```ts
 * import { HISTORY_FORMATS } from "./history_format.ts";
 * if (HISTORY_FORMATS.join() !== "text,csv,json") throw new Error();
 * ```
 */
export const HISTORY_FORMATS = ["text", "csv", "json"] as const;

/** One of {@linkcode HISTORY_FORMATS}. */
export type HistoryFormat = typeof HISTORY_FORMATS[number];

type Cell = string | number | null;

function csvCell(value: Cell): string {
  if (value === null) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  const safe = neutraliseFormula(value);
  return /[",\n\r]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
}

function aligned(header: readonly string[], rows: readonly string[][]): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (cells: readonly string[]) =>
    cells.map((c, i) => (i === cells.length - 1 ? c : c.padEnd(widths[i]))).join("  ").trimEnd();
  return [line(header), ...rows.map(line)].join("\n") + "\n";
}

function tabular(
  header: readonly string[],
  rows: readonly Cell[][],
  shown: readonly string[][],
  format: HistoryFormat,
): string {
  if (format === "csv") {
    return [header.join(","), ...rows.map((r) => r.map(csvCell).join(","))].join("\n") + "\n";
  }
  if (format === "json") {
    const objects = rows.map((r) => Object.fromEntries(header.map((h, i) => [h, r[i]])));
    return JSON.stringify(objects, null, 2) + "\n";
  }
  return aligned(header, shown);
}

const TREND_COLUMNS = ["build", "value", "limit", "verdict", "unit", "run", "started"];

/**
 * A target's trend: one line per run in order of addition, the build first,
 * then the value, the limit and the verdict.
 *
 * @example
 * ```ts
 * import { formatTrend } from "./history_format.ts";
 * const points = [
 *   { build: "B1", value: 36.5, limit: 38, verdict: "fail" as const, unit: "Hz", seq: 1, started: "2026-01-01", description: "" },
 *   { build: "B2", value: null, limit: null, verdict: "not_checked" as const, unit: "Hz", seq: 2, started: "2026-02-01", description: "" },
 * ];
 * if (formatTrend(points, "csv").split("\n")[2] !== "B2,,,not_checked,Hz,2,2026-02-01") throw new Error();
 * if (!formatTrend(points, "text").split("\n")[1].startsWith("B1     36.5")) throw new Error();
 * ```
 */
export function formatTrend(points: readonly TrendPoint[], format: HistoryFormat): string {
  const rows = points.map((p) => [p.build, p.value, p.limit, p.verdict, p.unit, p.seq, p.started]);
  const shown = points.map((p) => [
    p.build,
    formatNumber(p.value, 5),
    formatNumber(p.limit, 5),
    p.verdict,
    p.unit ?? "",
    String(p.seq),
    p.started,
  ]);
  return tabular(TREND_COLUMNS, rows, shown, format);
}

const LIST_COLUMNS = [
  "run",
  "build",
  "vehicle",
  "plan",
  "started",
  "status",
  "targets_passed",
  "targets",
  "quiver_version",
  "plan_sha256",
  "note",
];

/**
 * The runs of a history, in order of addition.
 *
 * @example
 * ```ts
 * import { formatRuns } from "./history_format.ts";
 * const run = { seq: 1, build: "B2", vehicle: null, note: null, planTitle: "road", planSha256: "ab",
 *   quiverVersion: "0.1.0", started: "2026-01-01", status: "ok", added: "2026-01-02", targetsPassed: 3, targets: 4 };
 * if (JSON.parse(formatRuns([run], "json"))[0].targets_passed !== 3) throw new Error();
 * ```
 */
export function formatRuns(runs: readonly RunSummary[], format: HistoryFormat): string {
  const rows = runs.map((r) => [
    r.seq,
    r.build,
    r.vehicle,
    r.planTitle,
    r.started,
    r.status,
    r.targetsPassed,
    r.targets,
    r.quiverVersion,
    r.planSha256,
    r.note,
  ]);
  const shown = runs.map((r) => [
    String(r.seq),
    r.build,
    r.vehicle ?? "",
    r.planTitle,
    r.started,
    r.status,
    String(r.targetsPassed),
    String(r.targets),
    r.quiverVersion,
    r.planSha256.slice(0, 12),
    r.note ?? "",
  ]);
  return tabular(LIST_COLUMNS, rows, shown, format);
}
