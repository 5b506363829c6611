/**
 * The report section of a sound level against time: every channel's level,
 * titled with its frequency and time weighting.
 *
 * @module
 */
import type { ResultTable } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { type Figure, lineFigure, withUnit } from "../figure.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers } from "../section_data.ts";

function levelFigures(id: string, title: string, r: ResultTable): Figure[] {
  const m = resultMetadata(r, "level");
  const t = numbers(r.columns[0]);
  return [{
    name: `${id}_level`,
    ...lineFigure({
      title: `${title}: ${
        m.weighting === "per channel" ? "weighting per channel" : `${m.weighting}-weighted`
      }, ${m.time_weighting} time weighting`,
      x: { label: "Time [s]" },
      y: { label: withUnit("Level", r.columns[1]?.unit ?? "") },
      series: r.columns.slice(1).map((c) => ({ name: c.name, x: t, y: numbers(c) })),
    }),
  }];
}

/** The section of a level step. */
export const section: SectionBuilder = ({ step, title, result, note }) =>
  Promise.resolve({ heading: title, note, figures: levelFigures(step.id, title, result) });
