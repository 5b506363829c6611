/**
 * The report's "Targets" section: every target of the plan with its value,
 * limit, margin and verdict (and the bands or lines over a limit curve),
 * and its entry in the contents.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import type { TargetOutcome } from "../plan/target_eval.ts";
import type { ContentsEntry } from "./contents.ts";
import { escapeXml } from "./escape_xml.ts";

/** The table of the targets' outcomes ("The plan sets no targets." without any). */
export function targetTable(targets: readonly TargetOutcome[]): string {
  if (targets.length === 0) return "<p>The plan sets no targets.</p>";
  const rows = targets.map((t) => {
    if (t.status === "not_checked") {
      return `<tr class="unchecked"><td>${escapeXml(t.id)}</td><td>${
        escapeXml(t.description)
      }</td><td colspan="3">not checked: ${
        escapeXml(t.reason)
      }</td><td class="verdict">—</td></tr>`;
    }
    // Four significant digits: a level to 0.1 dB, a frequency to 0.1 Hz, a ratio to 0.001.
    const fmt = (v: number) => formatNumber(v, 4);
    const unit = t.unit !== "" ? ` ${escapeXml(t.unit)}` : "";
    const where = t.atNominalHz !== undefined
      ? ` in the ${fmt(t.atNominalHz)} Hz band`
      : t.atHz !== undefined
      ? ` at ${fmt(t.atHz)} Hz`
      : "";
    const failing = t.failing ?? [];
    const list = failing.length > 0
      ? `<div class="failing">${failing.length} ${
        t.atNominalHz !== undefined ? "band(s)" : "line(s)"
      } over the limit: ${
        failing.slice(0, 40).map((x) =>
          `${x.nominalHz !== undefined ? fmt(x.nominalHz) : fmt(x.atHz)} Hz (${
            fmt(x.margin)
          }${unit})`
        ).join(", ")
      }${failing.length > 40 ? ", …" : ""}</div>`
      : "";
    return `<tr class="${t.pass ? "pass" : "fail"}"><td>${escapeXml(t.id)}</td><td>${
      escapeXml(t.description)
    }</td><td>${fmt(t.value)}${unit}${where}${list}</td><td>${fmt(t.limit)}${unit}</td><td>${
      fmt(t.margin)
    }${unit}</td><td class="verdict">${t.pass ? "PASS" : "FAIL"}</td></tr>`;
  }).join("\n");
  return `<table class="targets"><thead><tr><th>Target</th><th>Requirement</th><th>Result</th><th>Limit</th><th>Margin</th><th>Verdict</th></tr></thead><tbody>${rows}</tbody></table>`;
}

/** The targets' own entry: failed when any is not met, warnings when any was not checked. */
export function targetsStatus(targets: readonly TargetOutcome[]): ContentsEntry {
  const checked = targets.filter((t) => t.status === "checked");
  const failed = checked.filter((t) => !t.pass).length;
  const detail = targets.length === 0
    ? "none set"
    : `${checked.length - failed} of ${targets.length} met`;
  return {
    anchor: "targets",
    heading: "Targets",
    status: failed > 0 ? "target failed" : checked.length < targets.length ? "warnings" : "ok",
    detail,
  };
}
