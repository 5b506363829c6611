/**
 * The report section of a speech step: the speech intelligibility index per
 * channel with the standard it follows, each band's contribution (from the
 * step's bands side result) and the note on what the index is for.
 *
 * @module
 */
import { escapeXml } from "../escape_xml.ts";
import { formatNumber } from "../../format_number.ts";
import { SPEECH_METADATA } from "../../quality/speech_metadata.ts";
import type { SectionBuilder, SectionInput } from "../section.ts";
import { barFigure, type Figure } from "../figure.ts";
import { numbers, sideResult } from "../section_data.ts";

/** Each band's contribution I_i·A_i per channel, as bars, when the side result is there. */
async function contributionFigures(input: SectionInput): Promise<Figure[]> {
  const r = await sideResult(input, "bands");
  const channel = r?.columns.find((c) => c.name === "channel");
  const center = r?.columns.find((c) => c.name === "center_hz");
  const contribution = r?.columns.find((c) => c.name === "contribution");
  if (channel === undefined || center === undefined || contribution === undefined) return [];
  const names = Array.from(channel.values, String);
  const f = numbers(center), v = numbers(contribution);
  const channels = [...new Set(names)];
  const first = names.map((n, i) => (n === channels[0] ? i : -1)).filter((i) => i >= 0);
  return [{
    name: `${input.step.id}_contributions`,
    ...barFigure({
      title: `${input.title}: each band's contribution to the index`,
      labels: first.map((i) => formatNumber(f[i])),
      groups: channels.map((name) => ({
        name,
        values: Float64Array.from(
          names.flatMap((n, i) => (n === name ? [i] : [])),
          (i) => v[i],
        ),
      })),
      xLabel: "One-third octave band [Hz]",
      yLabel: "Contribution (importance × audibility)",
      baseline: 0,
    }),
  }];
}

/** The section of a speech step. */
export const section: SectionBuilder = async (input) => {
  const m = SPEECH_METADATA.parse(input.result.metadata);
  const rows = m.rows.map((r) =>
    `<tr><td>${escapeXml(r.channel)}</td><td>${escapeXml(formatNumber(r.sii, 3))}</td></tr>`
  );
  return {
    heading: input.title,
    note: input.note,
    figures: await contributionFigures(input),
    html:
      `<table class="speech"><thead><tr><th>channel</th><th>SII</th></tr></thead><tbody>${
        rows.join("")
      }</tbody></table>` +
      `<p>${escapeXml(`${m.standard}; ${m.speech_spectrum}; ${m.hearing}.`)}</p>` +
      `<p class="safety">${escapeXml(m.safety)}</p>`,
  };
};
