/**
 * The report section of a hammer test: the FRFs up to the usable
 * bandwidth, the force autospectrum with that limit marked, and each hit's
 * force and first response against time with its status, so a rejected hit
 * is seen.
 *
 * @module
 */
import { formatNumber } from "../../format_number.ts";
import { numericColumn } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { type Figure, frequencyDomain, lineFigure, NARROW_WIDTH, withUnit } from "../figure.ts";
import type { Series } from "../plot/line_plot.ts";
import type { SectionBuilder, SectionInput } from "../section.ts";
import { numbers, sideResult } from "../section_data.ts";
import { frfFigures, noteWithHits } from "./frf.ts";
import { isFrfMatrix, section as matrixSection } from "./frf_matrix.ts";

/** Hits drawn one by one at most (the rest are counted in the note). */
const HITS_DRAWN = 24;

async function hammerFigures(input: SectionInput): Promise<Figure[]> {
  const { title, result: r } = input;
  const id = input.step.id;
  const m = resultMetadata(r, "hammer");
  const limit = m.usable_bandwidth_hz ?? undefined;
  const figures = frfFigures(id, title, r, limit);
  const f = numbers(r.columns[0]);
  const force = numericColumn(r, "force_autospectrum");
  if (force !== undefined) {
    const positive = force.values.filter((v) => v > 0);
    const lo = positive.length > 0 ? positive.reduce((a, b) => Math.min(a, b)) : 1;
    const hi = positive.length > 0 ? positive.reduce((a, b) => Math.max(a, b)) : 1;
    const series: Series[] = [{ name: "force autospectrum", x: f, y: force.values }];
    if (limit !== undefined) {
      series.push({
        name: `usable bandwidth ${formatNumber(limit, 4)} Hz (${
          m.usable_bandwidth_drop_db ?? 20
        } dB down)`,
        // Two points a hair apart: a vertical line that the interactive chart's shared x axis keeps.
        x: [limit, limit * (1 + 1e-5)],
        y: [lo, hi],
        dashed: true,
      });
    }
    figures.push({
      name: `${id}_force`,
      ...lineFigure({
        title: `${title}: force autospectrum of the accepted hits`,
        x: { label: "Frequency [Hz]", log: true, domain: frequencyDomain(f) },
        y: { label: withUnit("Gff", force.unit), log: true },
        series,
        height: 280,
      }),
    });
  }
  const records = await sideResult(input, "records");
  if (records !== undefined) {
    const meta = resultMetadata(records, "hammer_records");
    const t = numbers(records.columns[0]);
    const peakNormalised = (values: Float64Array) => {
      let peak = 0;
      for (const v of values) if (Math.abs(v) > peak) peak = Math.abs(v);
      return peak > 0 ? values.map((v) => v / peak) : values;
    };
    for (const hit of meta.hits.slice(0, HITS_DRAWN)) {
      const forceColumn = numericColumn(records, `hit_${hit.hit}_force`);
      const response = numericColumn(records, `hit_${hit.hit}_response`);
      if (forceColumn === undefined || response === undefined) continue;
      figures.push({
        name: `${id}_hit_${hit.hit}`,
        small: true,
        ...lineFigure({
          title: `Hit ${hit.hit}: ${hit.status}${
            hit.reason !== null ? ` (${hit.reason})` : ""
          }; force and response, each to its own peak`,
          x: { label: "Time from trigger [s]" },
          y: { label: "Normalised [-]", domain: [-1.1, 1.1] },
          series: [
            {
              name: `${meta.force.name} [${meta.force.unit}]`,
              x: t,
              y: peakNormalised(forceColumn.values),
            },
            {
              name: `${meta.response.name} [${meta.response.unit}]`,
              x: t,
              y: peakNormalised(response.values),
            },
          ],
          width: NARROW_WIDTH,
          height: 220,
        }),
      });
    }
  }
  return figures;
}

/** The section of a hammer step. */
export const section: SectionBuilder = async (input) => {
  if (isFrfMatrix(input.result)) return await matrixSection(input);
  return {
    heading: input.title,
    note: noteWithHits(input.note, input.result),
    figures: await hammerFigures(input),
  };
};
