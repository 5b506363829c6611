/**
 * The report section of a whole-body vibration step: the per-axis table,
 * the comfort reactions of ISO 2631-1 Annex C beside a_w (comfort only),
 * and the safety note.
 *
 * @module
 */
import { escapeXml } from "../escape_xml.ts";
import { formatNumber } from "../../format_number.ts";
import { COMFORT_METADATA } from "../../comfort/comfort_metadata.ts";
import type { SectionBuilder, SectionInput } from "../section.ts";
import { type Figure, lineFigure } from "../figure.ts";
import { numbers, sideResult } from "../section_data.ts";

type Row = {
  axis: string;
  channel: string;
  weighting: string;
  k: number | null;
  aw: number | null;
  mtvv: number | null;
  vdv: number | null;
  crest_factor: number | null;
  flags: readonly string[];
};

// from memory: ISO 2631-1:1997 Annex C.2.3, likely reactions of passengers in public transport
// to the overall vibration total value (the bands overlap, as the standard's do).
const REACTIONS: readonly [number, number, string][] = [
  [0, 0.315, "not uncomfortable"],
  [0.315, 0.63, "a little uncomfortable"],
  [0.5, 1, "fairly uncomfortable"],
  [0.8, 1.6, "uncomfortable"],
  [1.25, 2.5, "very uncomfortable"],
  [2, Infinity, "extremely uncomfortable"],
];

/**
 * The reactions of ISO 2631-1 Annex C whose band holds `aw` (m/s²).
 *
 * @example
 * ```ts
 * import { comfortReaction } from "./comfort.ts";
 * if (comfortReaction(0.7) !== "fairly uncomfortable") throw new Error();
 * if (comfortReaction(0.9) !== "fairly uncomfortable / uncomfortable") throw new Error();
 * ```
 */
export function comfortReaction(aw: number): string {
  return REACTIONS.filter(([lo, hi]) => aw >= lo && aw < hi).map(([, , name]) => name).join(
    " / ",
  );
}

/** The rows as an HTML table; with `reactions`, a column of Annex C's reactions. */
export function vibrationTableHtml(rows: readonly Row[], reactions: boolean): string {
  const f = (v: number | null) => escapeXml(formatNumber(v));
  const head = [
    "axis",
    "channel",
    "weighting",
    "k",
    "a_w [m/s²]",
    "MTVV [m/s²]",
    "VDV [m/s^1.75]",
    "crest factor",
    "flags",
    ...(reactions ? ["ISO 2631-1 Annex C"] : []),
  ];
  const body = rows.map((r) =>
    "<tr>" + [
      escapeXml(r.axis),
      escapeXml(r.channel),
      escapeXml(r.weighting),
      f(r.k),
      f(r.aw),
      f(r.mtvv),
      f(r.vdv),
      f(r.crest_factor),
      escapeXml(r.flags.join(", ")),
      ...(reactions ? [escapeXml(r.aw === null ? "" : comfortReaction(r.aw))] : []),
    ].map((c) => `<td>${c}</td>`).join("") + "</tr>"
  );
  return `<table class="vibration"><thead><tr>${
    head.map((h) => `<th>${escapeXml(h)}</th>`).join("")
  }</tr></thead><tbody>${body.join("")}</tbody></table>`;
}

/** The running r.m.s. against time, from the step's history side result when there is one. */
export async function historyFigures(input: SectionInput): Promise<Figure[]> {
  const h = await sideResult(input, "history");
  if (h === undefined || h.columns.length < 2) return [];
  const t = numbers(h.columns[0]);
  return [{
    name: `${input.step.id}_running_rms`,
    ...lineFigure({
      title: `${input.title}: running r.m.s. (τ = 1 s)`,
      x: { label: "Time [s]" },
      y: { label: "Weighted acceleration [m/s²]" },
      series: h.columns.slice(1).map((c) => ({ name: c.name, x: t, y: numbers(c) })),
    }),
  }];
}

/** The section of a comfort step. */
export const section: SectionBuilder = async (input) => {
  const m = COMFORT_METADATA.parse(input.result.metadata);
  const reactions = m.purpose === null || m.purpose === "comfort";
  return {
    heading: input.title,
    note: input.note,
    figures: await historyFigures(input),
    html: vibrationTableHtml(m.rows, reactions) + `<p class="safety">${escapeXml(m.safety)}</p>`,
  };
};
