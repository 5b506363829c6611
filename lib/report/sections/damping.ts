/**
 * The report section of a damping estimate: the table of modes per
 * channel, with half-power damping beside the primary estimate.
 *
 * @module
 */
import { formatFixed } from "../../format_number.ts";
import type { ResultTable } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { escapeXml } from "../escape_xml.ts";
import type { SectionBuilder } from "../section.ts";

function modeTable(r: ResultTable): string {
  const modes = resultMetadata(r, "damping").modes;
  const rows = modes.map((m) =>
    `<tr><td>${escapeXml(m.channel)}</td><td>${escapeXml(m.mode)}</td><td>${
      formatFixed(m.frequencyHz, 2)
    }</td><td>${formatFixed(m.dampingRatio === null ? null : 100 * m.dampingRatio, 2)}</td><td>${
      m.halfPower !== undefined
        ? formatFixed(
          m.halfPower.dampingRatio === null ? null : 100 * m.halfPower.dampingRatio,
          2,
        )
        : "–"
    }</td><td>${formatFixed(m.qFactor, 1)}</td><td>${escapeXml(m.method)}</td><td>${
      escapeXml(Array.isArray(m.flags) ? m.flags.join(", ") : m.flags)
    }</td></tr>`
  ).join("\n");
  return `<table><thead><tr><th>Channel</th><th>Mode</th><th>Frequency [Hz]</th><th>Damping [%]</th><th>Half-power damping [%]</th><th>Q</th><th>Primary</th><th>Flags</th></tr></thead><tbody>${rows}</tbody></table>`;
}

/** The section of a damping step. */
export const section: SectionBuilder = ({ title, result, note }) =>
  Promise.resolve({ heading: title, note, figures: [], html: modeTable(result) });
