/**
 * The report section of a loudness step: the table of loudness, loudness
 * level, sharpness (and N5, N10), the specific loudness against critical-band
 * rate and the loudness against time from the step's side results, and the
 * note that quiver is not a certified loudness meter.
 *
 * @module
 */
import { escapeXml } from "../escape_xml.ts";
import { formatNumber } from "../../format_number.ts";
import { LOUDNESS_METADATA } from "../../quality/loudness_metadata.ts";
import type { SectionBuilder, SectionInput } from "../section.ts";
import { type Figure, lineFigure } from "../figure.ts";
import { numbers, sideResult } from "../section_data.ts";

type Row = {
  channel: string;
  loudness: number | null;
  loudness_level: number | null;
  sharpness: number | null;
  n5: number | null;
  n10: number | null;
};

/**
 * The rows as an HTML table; with `timeVarying`, the N5 and N10 columns.
 *
 * @example
 * ```ts
 * import { loudnessTableHtml } from "./loudness.ts";
 * const html = loudnessTableHtml([{ channel: "mic", loudness: 1, loudness_level: 40, sharpness: 1.1,
 *   n5: null, n10: null }], false);
 * if (!html.includes("<td>40</td>") || html.includes("N5")) throw new Error();
 * ```
 */
export function loudnessTableHtml(rows: readonly Row[], timeVarying: boolean): string {
  const f = (v: number | null) => escapeXml(formatNumber(v));
  const head = [
    "channel",
    "N [sone]",
    "L_N [phon]",
    "S [acum]",
    ...(timeVarying ? ["N5 [sone]", "N10 [sone]"] : []),
  ];
  const body = rows.map((r) =>
    "<tr>" + [
      escapeXml(r.channel),
      f(r.loudness),
      f(r.loudness_level),
      f(r.sharpness),
      ...(timeVarying ? [f(r.n5), f(r.n10)] : []),
    ].map((c) => `<td>${c}</td>`).join("") + "</tr>"
  );
  return `<table class="loudness"><thead><tr>${
    head.map((h) => `<th>${escapeXml(h)}</th>`).join("")
  }</tr></thead><tbody>${body.join("")}</tbody></table>`;
}

async function specificFigure(input: SectionInput): Promise<Figure[]> {
  const s = await sideResult(input, "specific");
  if (s === undefined || s.columns.length < 3) return [];
  const channel = s.columns[0].values, z = numbers(s.columns[1]), n = numbers(s.columns[2]);
  const names = [...new Set(Array.from(channel, String))];
  return [{
    name: `${input.step.id}_specific_loudness`,
    ...lineFigure({
      title: `${input.title}: specific loudness`,
      x: { label: "Critical-band rate [Bark]" },
      y: { label: "Specific loudness [sone/Bark]" },
      series: names.map((name) => {
        const rows = Array.from(channel, String).flatMap((c, i) => (c === name ? [i] : []));
        return {
          name,
          x: Float64Array.from(rows, (i) => z[i]),
          y: Float64Array.from(rows, (i) => n[i]),
        };
      }),
    }),
  }];
}

async function historyFigure(input: SectionInput): Promise<Figure[]> {
  const h = await sideResult(input, "history");
  if (h === undefined || h.columns.length < 2) return [];
  const t = numbers(h.columns[0]);
  return [{
    name: `${input.step.id}_loudness_time`,
    ...lineFigure({
      title: `${input.title}: loudness against time`,
      x: { label: "Time [s]" },
      y: { label: "Loudness [sone]" },
      series: h.columns.slice(1).filter((c) => c.unit === "sone").map((c) => ({
        name: c.name,
        x: t,
        y: numbers(c),
      })),
    }),
  }];
}

/** The section of a loudness step. */
export const section: SectionBuilder = async (input) => {
  const m = LOUDNESS_METADATA.parse(input.result.metadata);
  const about = `${m.standard}; ${m.method}, ${m.field} field.`;
  return {
    heading: input.title,
    note: input.note,
    figures: [...await specificFigure(input), ...await historyFigure(input)],
    html: `<p>${escapeXml(about)}</p>` +
      loudnessTableHtml(m.rows, m.method === "time-varying") +
      `<p class="safety">${escapeXml(m.safety)}</p>`,
  };
};
