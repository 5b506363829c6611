/**
 * The report section of transfer paths: each path's contribution overlaid
 * on the measured target and the paths' sum, per-band levels when the plan
 * wrote them, and the ranking of the paths over the analysed range and per
 * octave.
 *
 * @module
 */
import { formatFixed, formatNumber } from "../../format_number.ts";
import { numericColumn } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { escapeXml } from "../escape_xml.ts";
import { barFigure, type Figure, frequencyDomain, lineFigure, withUnit } from "../figure.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers, requiredColumn, sideResult } from "../section_data.ts";

/** The section of a paths step. */
export const section: SectionBuilder = async (input) => {
  const { title, result: r } = input;
  const id = input.step.id;
  const m = resultMetadata(r, "paths");
  const f = numbers(r.columns[0]);
  const domain = frequencyDomain(f);
  const column = (name: string) => requiredColumn(r, name, "the paths result");
  // Ranked: the largest path over the analysed range first.
  const order = m.ranking[0]?.paths.map((p) => p.name) ?? m.paths.map((p) => p.name);
  const unit = column("target_measured").unit;
  const figures: Figure[] = [{
    name: `${id}_contributions`,
    ...lineFigure({
      title: `${title}: contributions at ${m.target.name} (${m.method}), ranked`,
      x: { label: "Frequency [Hz]", log: true, domain },
      y: { label: withUnit("Contribution", unit), log: true, power: false },
      series: [
        ...order.map((name) => ({ name, x: f, y: column(`${name}_contribution`).values })),
        { name: "sum of paths", x: f, y: column("sum_of_paths").values, dashed: true },
        {
          name: `${m.target.name} measured`,
          x: f,
          y: column("target_measured").values,
          dashed: true,
        },
      ],
    }),
  }];
  const bands = await sideResult(input, "bands");
  if (bands !== undefined) {
    const nominal = numericColumn(bands, "band_hz");
    const groups = [...order.map((n) => `${n}_level`), "sum_of_paths_level", "target_level"]
      .flatMap((name) => {
        const c = numericColumn(bands, name);
        return c === undefined ? [] : [{ name: name.replace(/_level$/, ""), values: c.values }];
      });
    if (nominal !== undefined && groups.length > 0) {
      figures.push({
        name: `${id}_bands`,
        ...barFigure({
          title: `${title}: per-band contributions (${m.level_unit})`,
          labels: Array.from(nominal.values, (v) => formatNumber(v, 4)),
          groups,
          xLabel: "Band nominal frequency [Hz]",
          yLabel: withUnit("Level", m.level_unit),
        }),
      });
    }
  }
  const rows = m.ranking.map((band) =>
    `<tr><td>${escapeXml(band.band)}</td><td>${
      band.paths.map((p) =>
        `${escapeXml(p.name)} ${formatFixed(p.level_db, 1)} (${formatFixed(p.share_percent, 0)} %)`
      ).join(", ")
    }</td></tr>`
  ).join("");
  const html = `<table><caption>Paths ranked by energy (${
    escapeXml(m.level_unit)
  }; share of the paths' total)</caption><thead><tr><th>Band</th><th>Paths, largest first</th></tr></thead><tbody>${rows}</tbody></table>`;
  return { heading: title, note: input.note, figures, html };
};
