/**
 * The report's contents: each section's status (failed, a target failed,
 * warnings, ok) as a badge, and the list of sections linking to them.
 *
 * @module
 */
import type { TargetOutcome } from "../plan/target_eval.ts";
import { escapeXml } from "./escape_xml.ts";
import type { ManifestStep, ReportSection } from "./section.ts";

/** A section's state in the contents, worst first. */
export type SectionStatus = "failed" | "target failed" | "warnings" | "ok";

/**
 * The state of a step's section: failed (no result shown), a target on it
 * not met, warnings (of the analysis, or a target on it that could not be
 * checked), or ok.
 */
export function sectionStatus(
  section: ReportSection,
  step: ManifestStep | undefined,
  targets: readonly { id: string; analysis: string }[],
  outcomes: ReadonlyMap<string, TargetOutcome>,
  warned: ReadonlySet<string>,
): { status: SectionStatus; detail: string } {
  if (section.failed === true || step === undefined) return { status: "failed", detail: "" };
  const own = targets.filter((t) => t.analysis === step.id).map((t) => outcomes.get(t.id));
  const failing = own.filter((o) => o?.status === "checked" && !o.pass);
  if (failing.length > 0) {
    return { status: "target failed", detail: failing.map((o) => o!.id).join(", ") };
  }
  const unchecked = own.filter((o) => o === undefined || o.status === "not_checked");
  if (warned.has(step.id) || unchecked.length > 0) {
    return {
      status: "warnings",
      detail: unchecked.length > 0 ? `${unchecked.length} target(s) not checked` : "",
    };
  }
  return { status: "ok", detail: "" };
}

/** A section as the contents list it. */
export interface ContentsEntry {
  readonly anchor: string;
  readonly heading: string;
  readonly status: SectionStatus;
  readonly detail: string;
}

/**
 * The table of contents: every section with its status, each a link to it.
 * Plain links and `<details>` sections: it all works without JavaScript.
 */
export function contents(entries: readonly ContentsEntry[]): string {
  const count = (status: SectionStatus) => entries.filter((e) => e.status === status).length;
  const summary = (["failed", "target failed", "warnings", "ok"] as const)
    .filter((s) => count(s) > 0)
    .map((s) => `${count(s)} × ${s}`)
    .join(" · ");
  return `<nav id="contents" class="contents" aria-label="Contents"><h2>Contents</h2><p class="note">${
    escapeXml(summary)
  }. Each section below opens and closes on its heading.</p><ol>${
    entries.map((e) =>
      `<li class="contents-${e.status.replace(" ", "-")}"><a href="#${escapeXml(e.anchor)}">${
        escapeXml(e.heading)
      }</a> ${statusBadge(e.status, e.detail)}</li>`
    ).join("")
  }<li><a href="#trace">Trace</a></li></ol></nav>`;
}

/** A status as a badge: a symbol and a word, so it reads without colour. */
export function statusBadge(status: SectionStatus, detail = ""): string {
  const symbol = { "failed": "✕", "target failed": "✕", "warnings": "!", "ok": "✓" }[status];
  return `<span class="status status-${status.replace(" ", "-")}">${symbol} ${status}${
    detail !== "" ? `: ${escapeXml(detail)}` : ""
  }</span>`;
}

/** The anchor of a step's section (step ids are the plan's; encoded all the same). */
export function sectionAnchor(stepId: string): string {
  return `section-${encodeURIComponent(stepId)}`;
}
