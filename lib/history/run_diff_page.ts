/**
 * `quiver diff`'s page, `diff.html`, built from the report's pieces (its
 * style, line plots and section shape, lib/report/): what changed beyond
 * chance, ranked; each spectral step's change with its interval; single
 * values; targets whose verdict changed; the steps left out and why. The
 * sections are plain {@linkcode ReportSection}s, so a later section (a
 * build-to-build trend from the history store) is one more entry of
 * `extra` in {@linkcode diffPage}.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import { escapeXml } from "../report/escape_xml.ts";
import { lineFigure } from "../report/figure.ts";
import type { ReportSection } from "../report/section.ts";
import { reportStyle } from "../report/style.ts";
import type { RunDiff } from "./run_diff.ts";

/** Channels drawn per spectral step at most (the changed ones first). */
const MAX_DRAWN = 4;

const cell = (v: unknown) => `<td>${escapeXml(v)}</td>`;
const num = (v: number | null, digits = 4) => cell(v === null ? "n/a" : formatNumber(v, digits));

function table(head: readonly string[], rows: readonly string[]): string {
  return `<table><thead><tr>${
    head.map((h) => `<th>${escapeXml(h)}</th>`).join("")
  }</tr></thead><tbody>${rows.map((r) => `<tr>${r}</tr>`).join("\n")}</tbody></table>`;
}

/**
 * The diff's own sections: the ranking, each spectral step, single values,
 * targets, and the steps not compared.
 */
export function diffSections({ summary, tables }: RunDiff): ReportSection[] {
  const pct = (x: number) => `${formatNumber(100 * x, 3)} %`;
  const sections: ReportSection[] = [{
    heading: "Changed beyond chance, ranked",
    note: `Channels with more significant lines than chance gives at ${
      pct(summary.confidence)
    } confidence (a repeat with the same statistics is significant on about ${
      pct(1 - summary.confidence)
    } of its lines). First those whose largest change holds for all their lines at once (the
    confidence raised for the number of lines, Bonferroni), then the others; each by their largest
    significant change.`,
    figures: [],
    html: summary.ranking.length === 0 ? "<p>Nothing changed beyond chance.</p>" : table(
      ["Step", "Channel", "Significant lines", "Largest change, dB", "At", "Holds for all lines"],
      summary.ranking.map((r) =>
        cell(r.step) + cell(r.channel) + cell(pct(r.significantShare)) + num(r.largestDb, 3) +
        cell(r.at.map((v) => formatNumber(v, 5)).join(", ")) + cell(r.familywise ? "yes" : "no")
      ),
    ),
  }];
  for (const s of summary.spectral) {
    const t = tables.get(s.step);
    const grid = t?.columns[0];
    // A spectrogram's lines lie on two axes: its table, not a line plot, shows them.
    const oneAxis = s.grid.length === 1;
    const drawn = [...s.channels].sort((a, b) => Number(b.changed) - Number(a.changed)).slice(
      0,
      MAX_DRAWN,
    );
    const figures =
      t === undefined || grid === undefined || !(grid.values instanceof Float64Array) || !oneAxis
        ? []
        : drawn.map((ch) => {
          const column = (suffix: string) =>
            t.columns.find((c) => c.name === `${ch.channel}_${suffix}`)?.values as Float64Array;
          const x = grid.values as Float64Array;
          return {
            name: `diff_${s.step}_${ch.channel}`,
            ...lineFigure({
              title: `${s.step}: ${ch.channel}, candidate against baseline`,
              x: { label: grid.name === "rpm" ? "Speed [rpm]" : "Frequency [Hz]" },
              y: { label: "Change [dB]" },
              series: [
                { name: "change", x, y: column("difference_db") },
                {
                  name: `lower bound (${pct(summary.confidence)})`,
                  x,
                  y: column("lower_db"),
                  dashed: true,
                },
                { name: "upper bound", x, y: column("upper_db"), dashed: true },
              ],
            }),
          };
        });
    sections.push({
      heading: `${s.step} (${s.command})`,
      note:
        `${s.commonLines} common line(s). Baseline: ${s.baselineStatistics}. Candidate: ${s.candidateStatistics}. Table: ${s.file}.`,
      figures,
      html: table(
        [
          "Channel",
          "Lines",
          "Significant",
          "Mean change, dB",
          "Largest significant, dB",
          "Beyond chance",
        ],
        s.channels.map((ch) =>
          cell(ch.channel) + cell(ch.lines) + cell(`${ch.significant} of ${ch.judged}`) +
          num(ch.meanDifferenceDb, 3) + num(ch.largest?.differenceDb ?? null, 3) +
          cell(ch.changed ? "yes" : "no")
        ),
      ) + (s.onlyBaselineChannels.length + s.onlyCandidateChannels.length > 0
        ? `<p>Only in the baseline: ${
          escapeXml(s.onlyBaselineChannels.join(", ") || "none")
        }; only in the candidate: ${escapeXml(s.onlyCandidateChannels.join(", ") || "none")}.</p>`
        : ""),
    });
  }
  sections.push({
    heading: "Single values",
    note:
      "Modes, damping and levels as each run's results give them: old, new and change (no interval: the results carry none).",
    figures: [],
    html: summary.values.length === 0 ? "<p>None.</p>" : table(
      ["Step", "Value", "Unit", "Baseline", "Candidate", "Change"],
      summary.values.map((v) =>
        cell(v.step) + cell(v.name) + cell(v.unit) + num(v.old) + num(v.new) + num(v.change, 3)
      ),
    ),
  }, {
    heading: "Targets",
    note: "Each target's value and verdict in both runs; changed verdicts first.",
    figures: [],
    html: summary.targets.length === 0 ? "<p>No targets.</p>" : table(
      ["Target", "Unit", "Baseline", "Candidate", "Change", "Verdict"],
      [...summary.targets].sort((a, b) => Number(b.verdictChanged) - Number(a.verdictChanged)).map((
        t,
      ) =>
        cell(t.id) + cell(t.unit) + num(t.old) + num(t.new) + num(t.change, 3) +
        cell(t.verdictChanged ? `${t.oldVerdict} → ${t.newVerdict}` : t.newVerdict)
      ),
    ),
  }, {
    heading: "Steps not compared",
    figures: [],
    html: table(
      ["Step", "Why"],
      [
        ...summary.steps.notCompared.map((s) => cell(s.id) + cell(s.why)),
        ...summary.steps.onlyBaseline.map((id) => cell(id) + cell("only in the baseline")),
        ...summary.steps.onlyCandidate.map((id) => cell(id) + cell("only in the candidate")),
      ],
    ),
  });
  return sections;
}

/**
 * The diff page: the diff's sections (`diffSections`), then `extra` ones.
 *
 * @example
 * ```ts
 * import { diffPage } from "./run_diff_page.ts";
 * const run = { dir: "a", title: "B1", plan_sha256: "0".repeat(64), finished: null };
 * const html = diffPage({ tables: new Map(), summary: { analysis: "diff", quiver_version: "0", confidence: 0.95,
 *   note: "", baseline: run, candidate: { ...run, title: "B2" }, ranking: [], spectral: [], values: [], targets: [],
 *   steps: { compared: [], notCompared: [], onlyBaseline: [], onlyCandidate: [] } } },
 *   [{ heading: "Trend", figures: [] }]);
 * if (!html.includes("<h2>Trend</h2>") || !html.includes("Nothing changed beyond chance")) throw new Error();
 * ```
 */
export function diffPage(diff: RunDiff, extra: readonly ReportSection[] = []): string {
  const { summary } = diff;
  const body = [...diffSections(diff), ...extra].map((s) =>
    `<details class="section" open><summary><h2>${escapeXml(s.heading)}</h2></summary>\n${
      s.note === undefined ? "" : `<p class="note">${escapeXml(s.note)}</p>`
    }${
      s.figures.map((f) =>
        `<figure>${
          f.narrow === undefined
            ? f.svg
            : `<div class="wide-picture">${f.svg}</div><div class="narrow-picture">${f.narrow}</div>`
        }</figure>`
      ).join("\n")
    }${s.html ?? ""}\n</details>`
  ).join("\n");
  const title = `${summary.candidate.title} against ${summary.baseline.title}`;
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeXml(title)}</title>
<meta name="generator" content="quiver ${escapeXml(summary.quiver_version)}">
<style>${reportStyle()}</style></head>
<body><header><h1>${escapeXml(title)}</h1>
<p>Baseline ${escapeXml(summary.baseline.dir)} (finished ${
    escapeXml(summary.baseline.finished ?? "n/a")
  }) · candidate ${escapeXml(summary.candidate.dir)} (finished ${
    escapeXml(summary.candidate.finished ?? "n/a")
  }) · confidence ${escapeXml(summary.confidence)}</p></header>
<main>
<p class="caveat">quiver compares test runs for engineering decisions; it is not a certified instrument. For compliance and exposure follow local regulations and licensed practice.</p>
${body}
</main>
</body></html>
`;
}
