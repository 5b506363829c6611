/**
 * The report section of an FRF: magnitude, phase and coherence of every
 * response against the input (an FRF matrix has its own section).
 *
 * @module
 */
import { formatNumber } from "../../format_number.ts";
import { numericColumn, type ResultTable } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { type Figure, frequencyDomain, lineFigure, withUnit } from "../figure.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers } from "../section_data.ts";
import { isFrfMatrix, section as matrixSection } from "./frf_matrix.ts";

/**
 * The FRF's figures: |H|, phase and coherence of each response the
 * metadata lists, up to `limitHz` when given (a hammer's usable bandwidth).
 */
export function frfFigures(id: string, title: string, r: ResultTable, limitHz?: number): Figure[] {
  const m = resultMetadata(r, "frf");
  const all = numbers(r.columns[0]);
  // A hammer FRF is drawn up to the hammer's usable bandwidth: beyond it the force is too weak.
  let lines = all.length;
  if (limitHz !== undefined) { while (lines > 2 && all[lines - 1] > limitHz) lines--; }
  const f = all.subarray(0, lines);
  // Each response's columns by their exact names, from the responses the metadata lists.
  const part = (suffix: string) =>
    m.responses.flatMap((response) => {
      const column = numericColumn(r, `${response.name}_${suffix}`);
      return column === undefined ? [] : [{ name: response.name, column }];
    });
  const domain = frequencyDomain(f);
  const mags = part("mag");
  const plotOf = (parts: ReturnType<typeof part>) =>
    parts.map(({ name, column }) => ({ name, x: f, y: column.values.subarray(0, lines) }));
  const limited = limitHz !== undefined && lines < all.length
    ? `, shown up to the usable bandwidth ${formatNumber(limitHz, 4)} Hz`
    : "";
  return [
    {
      name: `${id}_magnitude`,
      ...lineFigure({
        title: `${title}: |H| (${m.estimator}, ${m.averages} averages${limited})`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: withUnit("|H|", mags[0]?.column.unit ?? ""), log: true, power: false },
        series: plotOf(mags),
      }),
    },
    {
      name: `${id}_phase`,
      ...lineFigure({
        title: `${title}: phase`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: "Phase [deg]", domain: [-180, 180] },
        series: plotOf(part("phase_deg")),
        height: 240,
      }),
    },
    {
      name: `${id}_coherence`,
      ...lineFigure({
        title: `${title}: ordinary coherence`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: "Coherence γ² [-]", domain: [0, 1] },
        series: plotOf(part("coherence")),
        height: 240,
      }),
    },
  ];
}

/** The common note with the summary of the hits appended, when the FRF has one. */
export function noteWithHits(note: string, r: ResultTable): string {
  const hits = resultMetadata(r, "frf").hits_summary;
  return hits === undefined ? note : `${note}; ${hits}`;
}

/** The section of an frf step. */
export const section: SectionBuilder = (input) => {
  if (isFrfMatrix(input.result)) return matrixSection(input);
  const { step, title, result } = input;
  return Promise.resolve({
    heading: title,
    note: noteWithHits(input.note, result),
    figures: frfFigures(step.id, title, result),
  });
};
