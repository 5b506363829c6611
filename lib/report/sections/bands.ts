/**
 * The report section of fractional-octave bands: every channel's band
 * levels as bars, the plan's limit curves on them with the bands over a
 * limit marked, and each channel's overall level in the note.
 *
 * @module
 */
import { limitAt } from "../../compare/targets.ts";
import { formatFixed, formatNumber } from "../../format_number.ts";
import type { ResultTable } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { barFigure, type Figure, withUnit } from "../figure.ts";
import type { CurveLimit, SectionBuilder } from "../section.ts";
import { numbers } from "../section_data.ts";

function bandFigures(
  id: string,
  title: string,
  r: ResultTable,
  limits: readonly CurveLimit[] = [],
): Figure[] {
  const m = resultMetadata(r, "bands");
  const nominal = r.columns.find((c) => c.name === "nominal_hz")!;
  const centre = numbers(r.columns[0]);
  const channels = r.columns.slice(4);
  // Each limit curve at every band's centre (null outside its range), and the bands that fail.
  const drawn = limits.filter((l) => channels.some((c) => c.name === l.channel)).map((l) => {
    const failed = new Set(
      l.outcome?.status === "checked" ? (l.outcome.failing ?? []).map((x) => x.atHz) : [],
    );
    return {
      name: `limit ${l.id}`,
      group: l.channel,
      values: Array.from(centre, (f) => limitAt(l.points, f) ?? null),
      failing: Array.from(centre, (f) => failed.has(f)),
    };
  });
  return [{
    name: `${id}_bands`,
    ...barFigure({
      title: `${title}: 1/${m.fraction}-octave bands, ${m.weighting}-weighted${
        drawn.some((l) => l.failing.some((f) => f))
          ? "; bands over the limit hatched and marked"
          : ""
      }`,
      labels: Array.from(numbers(nominal), (v) => formatNumber(v, 4)),
      groups: channels.map((c) => ({ name: c.name, values: numbers(c) })),
      xLabel: "Band nominal frequency [Hz]",
      yLabel: withUnit("Level", channels[0]?.unit ?? ""),
      limits: drawn,
    }),
  }];
}

/** The section of a bands step. */
export const section: SectionBuilder = ({ step, title, result, note, limits }) => {
  const overall = resultMetadata(result, "bands").overall
    .map((o) =>
      // Raw text: the note is escaped once, where it is rendered.
      `${o.channel}: ${formatFixed(o.level_db, 1)} ${o.unit}`
    )
    .join("; ");
  return Promise.resolve({
    heading: title,
    note: `${note}; overall ${overall}`,
    figures: bandFigures(step.id, title, result, limits),
  });
};
