/**
 * The report's page: header, caveat, contents, the targets, every section
 * (each opening and closing on its heading, its figures wide and narrow),
 * the trace of what was produced from what, and the inlined style and
 * scripts. One self-contained HTML file, no network.
 *
 * @module
 */
import type { Manifest } from "../plan/runner.ts";
import type { Plan } from "../plan/schema.ts";
import type { TargetOutcome } from "../plan/target_eval.ts";
import { contents, type ContentsEntry, statusBadge } from "./contents.ts";
import { escapeXml } from "./escape_xml.ts";
import type { Figure } from "./figure.ts";
import { chartScripts } from "./scripts.ts";
import type { ReportSection } from "./section.ts";
import { reportStyle } from "./style.ts";
import { targetsStatus, targetTable } from "./targets_section.ts";
import { scriptJson } from "./time_history.ts";

/** A section that opens and closes on its heading (open to start with, and in print). */
function collapsible(entry: ContentsEntry, inner: string): string {
  return `<details class="section" id="${escapeXml(entry.anchor)}" open><summary><h2>${
    escapeXml(entry.heading)
  }</h2> ${statusBadge(entry.status, entry.detail)}</summary>\n${inner}\n</details>`;
}

/**
 * A figure: its static SVG (what prints and what shows without JavaScript)
 * and, for a line plot, its data for the interactive chart.
 */
function figureHtml(f: Figure, file: string): string {
  const id = `figure-${escapeXml(file)}`;
  const small = f.small === true ? ' class="small"' : "";
  if (f.html !== undefined) return `<figure id="${id}"${small}>${f.html}</figure>`;
  // Two layouts of the picture; the style sheet shows the one that suits the window.
  const pictures = f.narrow === undefined
    ? f.svg
    : `<div class="wide-picture">${f.svg}</div><div class="narrow-picture">${f.narrow}</div>`;
  if (f.chart === undefined) return `<figure id="${id}"${small}>${pictures}</figure>`;
  return `<figure id="${id}"${small} data-chart=""><div class="static">${pictures}</div>${
    scriptJson(f.chart, "chart-data")
  }</figure>`;
}

/** What the page shows. */
export interface PageInput {
  readonly manifest: Manifest;
  readonly plan: Plan;
  /** The sections in order, after the targets. */
  readonly sections: readonly ReportSection[];
  /** Each section's entry in the contents, in the same order. */
  readonly entries: readonly ContentsEntry[];
  /** Each figure's file name under `figures/` (without `.svg`). */
  readonly fileOf: ReadonlyMap<Figure, string>;
}

/** The report's HTML. */
export function reportPage({ manifest, plan, sections, entries, fileOf }: PageInput): string {
  const trace = manifest.steps.map((s) =>
    `<tr><td>${escapeXml(s.id)}</td><td>${escapeXml(s.command)}</td><td>${
      escapeXml(s.status)
    }</td><td>${
      s.inputs.map((i) =>
        `${escapeXml(String(i.path).split("/").pop())} (${escapeXml(i.bytes)} B, sha256 ${
          escapeXml(String(i.sha256).slice(0, 12))
        }…)`
      ).join("<br>")
    }</td><td>${Object.values(s.outputs).map((o) => escapeXml(o.path)).join("<br>")}</td></tr>`
  ).join("\n");
  const title = plan.report?.title ?? plan.title;
  const body = sections.map((s, i) =>
    collapsible(
      entries[i],
      `${s.note !== undefined ? `<p class="note">${escapeXml(s.note)}</p>` : ""}${
        s.figures.map((f) => figureHtml(f, fileOf.get(f) ?? "")).join("\n")
      }${s.html ?? ""}`,
    )
  ).join("\n");
  const targetsEntry = targetsStatus(manifest.targets as TargetOutcome[]);
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeXml(title)}</title>
<meta name="generator" content="quiver ${escapeXml(manifest.quiver_version)}">
<style>${reportStyle()}</style></head>
<body><header><h1>${escapeXml(title)}</h1>
<p>${escapeXml(plan.description ?? "")}</p>
<p>quiver ${escapeXml(manifest.quiver_version)} · plan ${
    escapeXml(manifest.plan.path.split("/").pop() ?? "")
  } (sha256 ${escapeXml(String(manifest.plan.sha256).slice(0, 12))}…) · run ${
    escapeXml(manifest.started)
  } · status ${escapeXml(manifest.status)}</p></header>
<main>
<p class="caveat">Levels in this report are for engineering comparison between tests, simulations and targets. quiver is not a certified sound level meter; for occupational noise exposure and hearing protection follow local regulations and use certified instruments.</p>
${contents([targetsEntry, ...entries])}
${collapsible(targetsEntry, targetTable(manifest.targets as TargetOutcome[]))}
${body}
<details class="section" id="trace" open><summary><h2>Trace</h2></summary>
<p class="note">Every result in this folder, with the inputs it was computed from; manifest.json holds the full record (options, hashes, times).</p>
<table><thead><tr><th>Step</th><th>Command</th><th>Status</th><th>Inputs</th><th>Outputs</th></tr></thead><tbody>${trace}</tbody></table>
</details>
</main>
<a class="to-contents" href="#contents">↑ Contents</a>
${chartScripts()}
</body></html>
`;
}
