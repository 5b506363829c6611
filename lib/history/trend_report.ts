/**
 * `quiver history report`: every target against build, one plot each (the
 * report's bar plots, static SVG: the value of each run as a bar, the limit
 * as a dashed step line, failing runs marked), with its table, in one
 * self-contained HTML page styled as the run report.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import { escapeXml } from "../report/escape_xml.ts";
import { barPlot } from "../report/plot/bar_plot.ts";
import { reportStyle } from "../report/style.ts";
import type { RunSummary, TrendPoint } from "./history_store.ts";

/** One target's trend, for the page. */
export interface TargetTrend {
  readonly id: string;
  readonly points: readonly TrendPoint[];
}

/** A run's label on the build axis: the build, with the run's number when a build has several. */
function labels(points: readonly TrendPoint[]): string[] {
  const count = new Map<string, number>();
  for (const p of points) count.set(p.build, (count.get(p.build) ?? 0) + 1);
  return points.map((p) => (count.get(p.build)! > 1 ? `${p.build} (run ${p.seq})` : p.build));
}

/** The bars' start: below the lowest value and limit by a tenth of their spread, so every bar shows. */
function baselineOf(points: readonly TrendPoint[]): number | undefined {
  const values = points.flatMap((p) => [p.value, p.limit]).filter((v): v is number =>
    v !== null && Number.isFinite(v)
  );
  if (values.length === 0) return undefined;
  let lo = values[0], hi = values[0];
  for (const v of values) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const spread = hi > lo ? hi - lo : Math.abs(hi) > 0 ? Math.abs(hi) : 1;
  return lo - 0.1 * spread;
}

/**
 * The SVG of one target against build.
 *
 * @example
 * ```ts
 * import { trendPlot } from "./trend_report.ts";
 * const p = (build: string, value: number, seq: number) => ({ build, value, limit: 38,
 *   verdict: value >= 38 ? "pass" as const : "fail" as const, unit: "Hz", seq, started: "", description: "first mode ≥ 38 Hz" });
 * const svg = trendPlot({ id: "first_mode", points: [p("B1", 36.5, 1), p("B2", 41.2, 2)] });
 * if ((svg.match(/<rect class="bar/g) ?? []).length !== 2 || (svg.match(/class="bar failing"/g) ?? []).length !== 1) throw new Error();
 * ```
 */
export function trendPlot(trend: TargetTrend): string {
  const { points } = trend;
  const unit = points.find((p) => p.unit !== null && p.unit !== "")?.unit;
  const baseline = baselineOf(points);
  return barPlot({
    title: `${trend.id}: ${points[points.length - 1]?.description ?? ""}`,
    labels: labels(points),
    groups: [{ name: trend.id, values: points.map((p) => p.value ?? NaN) }],
    xLabel: "Build (in order of addition)",
    yLabel: unit === undefined ? "Value" : `Value [${unit}]`,
    ...(baseline !== undefined ? { baseline } : {}),
    limits: [{
      name: "limit",
      values: points.map((p) => p.limit),
      failing: points.map((p) => p.verdict === "fail"),
    }],
  });
}

function trendTable(trend: TargetTrend): string {
  const rows = trend.points.map((p, i) =>
    `<tr><td>${escapeXml(labels(trend.points)[i])}</td><td>${
      escapeXml(formatNumber(p.value, 5))
    }</td><td>${escapeXml(formatNumber(p.limit, 5))}</td><td>${escapeXml(p.unit ?? "")}</td><td>${
      escapeXml(p.verdict === "not_checked" ? "not checked" : p.verdict.toUpperCase())
    }</td></tr>`
  ).join("");
  return `<table><thead><tr><th>Build</th><th>Value</th><th>Limit</th><th>Unit</th><th>Verdict</th></tr></thead><tbody>${rows}</tbody></table>`;
}

/**
 * The trend page: the runs, then every target against build.
 *
 * @example
 * ```ts
 * import { trendPage } from "./trend_report.ts";
 * const html = trendPage({ where: "h.sqlite", version: "0.1.0", runs: [], trends: [] });
 * if (!html.startsWith("<!DOCTYPE html>") || !html.includes("not a certified")) throw new Error();
 * ```
 */
export function trendPage(input: {
  /** The database, as named to the command (no password). */
  readonly where: string;
  readonly version: string;
  readonly runs: readonly RunSummary[];
  readonly trends: readonly TargetTrend[];
}): string {
  const runs = input.runs.map((r) =>
    `<tr><td>${r.seq}</td><td>${escapeXml(r.build)}</td><td>${escapeXml(r.vehicle ?? "")}</td><td>${
      escapeXml(r.planTitle)
    }</td><td>${escapeXml(r.started)}</td><td>${
      escapeXml(r.status)
    }</td><td>${r.targetsPassed}/${r.targets}</td><td>${escapeXml(r.note ?? "")}</td></tr>`
  ).join("");
  const sections = input.trends.map((t) =>
    `<details class="section" id="target-${escapeXml(t.id)}" open><summary><h2>${
      escapeXml(t.id)
    }</h2></summary>\n<figure>${trendPlot(t)}</figure>\n${trendTable(t)}\n</details>`
  ).join("\n");
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>Target trends</title>
<meta name="generator" content="quiver ${escapeXml(input.version)}">
<style>${reportStyle()}</style></head>
<body><header><h1>Target trends</h1>
<p>${escapeXml(input.where)} · ${input.runs.length} run(s) · quiver ${
    escapeXml(input.version)
  }</p></header>
<main>
<p class="caveat">Values here are for engineering comparison between builds and against targets. quiver is not a certified instrument; for occupational noise and vibration exposure follow local regulations and licensed practice.</p>
<details class="section" id="runs" open><summary><h2>Runs</h2></summary>
<table><thead><tr><th>Run</th><th>Build</th><th>Vehicle</th><th>Plan</th><th>Started</th><th>Status</th><th>Targets passed</th><th>Note</th></tr></thead><tbody>${runs}</tbody></table>
</details>
${sections}
</main></body></html>
`;
}
