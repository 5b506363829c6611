/**
 * The report section of a hand-arm vibration step: the per-axis table,
 * a_hv and A(8), and the safety note.
 *
 * @module
 */
import { escapeXml } from "../escape_xml.ts";
import { formatNumber } from "../../format_number.ts";
import { HAND_ARM_METADATA } from "../../comfort/hand_arm_metadata.ts";
import type { SectionBuilder } from "../section.ts";
import { historyFigures, vibrationTableHtml } from "./comfort.ts";

/** The section of a hand-arm step. */
export const section: SectionBuilder = async (input) => {
  const m = HAND_ARM_METADATA.parse(input.result.metadata);
  const a8 = m.a8 === null ? "" : `; A(8) = ${formatNumber(m.a8)} m/s² for ${m.exposure_hours} h`;
  return {
    heading: input.title,
    note: input.note,
    figures: await historyFigures(input),
    html: vibrationTableHtml(m.rows, false) +
      `<p>a_hv = ${escapeXml(formatNumber(m.a_hv) + a8)}</p>` +
      `<p class="safety">${escapeXml(m.safety)}</p>`,
  };
};
