/**
 * The report section of a tones step: against time, the tones' TNR beside
 * the criterion line over frequency, the averaged spectrum when the plan
 * wrote it, and the table of tones; against rpm, each order's TNR against
 * speed with the criterion at its frequency.
 *
 * @module
 */
import { QuiverError } from "../../errors.ts";
import { escapeXml } from "../escape_xml.ts";
import { formatNumber } from "../../format_number.ts";
import { TONES_METADATA } from "../../quality/tones_metadata.ts";
import { tnrCriterion } from "../../quality/tones_criteria.ts";
import { type Figure, lineFigure, withUnit } from "../figure.ts";
import type { SectionBuilder, SectionInput } from "../section.ts";
import { numbers, sideResult } from "../section_data.ts";
import type { ColumnValues, TableColumn } from "../../io/table.ts";

const find = (input: SectionInput, name: string): TableColumn<ColumnValues> => {
  const c = input.result.columns.find((c) => c.name === name);
  if (c === undefined) throw new QuiverError(`the tones result has no column "${name}"`);
  return c;
};
const text = (c: TableColumn<ColumnValues>): readonly string[] =>
  c.values instanceof Float64Array ? Array.from(c.values, String) : c.values;

/** The TNR criterion as a line over the criteria's range, a point per 1/24 decade. */
function criterionLine(): { x: number[]; y: number[] } {
  const x: number[] = [], y: number[] = [];
  for (let e = Math.log10(89.1); e <= Math.log10(11_220) + 1e-9; e += 1 / 24) {
    const f = Math.min(10 ** e, 11_220);
    x.push(f);
    y.push(tnrCriterion(f)!);
  }
  return { x, y };
}

async function timeFigures(input: SectionInput, channels: readonly string[]): Promise<Figure[]> {
  const id = input.step.id;
  const channel = text(find(input, "channel"));
  const f = numbers(find(input, "frequency_hz"));
  const tnr = numbers(find(input, "tnr_db"));
  const line = criterionLine();
  const figures: Figure[] = [{
    name: `${id}_tnr`,
    ...lineFigure({
      title: `${input.title}: tone-to-noise ratio of each tone and the TNR criterion`,
      x: { label: "Frequency [Hz]", log: true },
      y: { label: "TNR [dB]" },
      series: [
        { name: "criterion (ECMA-418-1)", x: line.x, y: line.y, dashed: true },
        ...channels.map((c) => {
          const rows = channel.flatMap((n, i) => n === c ? [i] : []);
          return {
            name: c,
            x: rows.map((i) => f[i]),
            y: rows.map((i) => tnr[i]),
            markers: true,
          };
        }),
      ],
    }),
  }];
  const spectrum = await sideResult(input, "spectrum");
  if (spectrum !== undefined && spectrum.columns.length >= 2) {
    const x = numbers(spectrum.columns[0]);
    figures.push({
      name: `${id}_spectrum`,
      ...lineFigure({
        title: `${input.title}: averaged spectrum (Hann) the tones were found in`,
        x: { label: "Frequency [Hz]", log: true },
        y: { label: withUnit("PSD", spectrum.columns[1].unit), log: true, power: true },
        series: spectrum.columns.slice(1).map((c) => ({ name: c.name, x, y: numbers(c) })),
      }),
    });
  }
  return figures;
}

function rpmFigures(input: SectionInput, orders: readonly number[]): Figure[] {
  const channel = text(find(input, "channel"));
  const rpm = numbers(find(input, "rpm"));
  const order = numbers(find(input, "order"));
  const tnr = numbers(find(input, "tnr_db"));
  const limit = numbers(find(input, "criterion_db"));
  const channels = [...new Set(channel)];
  return channels.map((c) => ({
    name: `${input.step.id}_tnr_${channels.indexOf(c)}`,
    ...lineFigure({
      title: `${input.title}: ${c}, TNR of the orders against speed, and the TNR criterion`,
      x: { label: "Speed [rpm]" },
      y: { label: "TNR [dB]" },
      series: orders.flatMap((k) => {
        const rows = channel.flatMap((n, i) => n === c && order[i] === k ? [i] : []);
        const x = rows.map((i) => rpm[i]);
        return [
          { name: `order ${formatNumber(k)}`, x, y: rows.map((i) => tnr[i]) },
          {
            name: `criterion at order ${formatNumber(k)}`,
            x,
            y: rows.map((i) => limit[i]),
            dashed: true,
          },
        ];
      }),
    }),
  }));
}

function toneTable(input: SectionInput): string {
  const cols = ["channel", "frequency_hz", "level_db", "tnr_db", "pr_db", "margin_db", "prominent"];
  const values = cols.map((n) => text(find(input, n)));
  const level = find(input, "level_db").unit;
  const head = [
    "channel",
    "frequency [Hz]",
    withUnit("level", level),
    "TNR [dB]",
    "PR [dB]",
    "margin [dB]",
    "prominent",
  ];
  const cell = (v: string, j: number) =>
    escapeXml(j === 0 || j === 6 ? v : formatNumber(Number(v)));
  const body = values[0].map((_, i) =>
    "<tr>" + values.map((v, j) => `<td>${cell(v[i], j)}</td>`).join("") + "</tr>"
  );
  return `<table class="tones"><thead><tr>${
    head.map((h) => `<th>${escapeXml(h)}</th>`).join("")
  }</tr></thead><tbody>${body.join("")}</tbody></table>`;
}

/** The section of a tones step. */
export const section: SectionBuilder = async (input) => {
  const m = TONES_METADATA.parse(input.result.metadata);
  const safety = `<p class="safety">${escapeXml(m.safety)}</p>`;
  if (m.against === "rpm") {
    return {
      heading: input.title,
      note: input.note,
      figures: rpmFigures(input, m.orders),
      html: safety,
    };
  }
  return {
    heading: input.title,
    note: input.note,
    figures: await timeFigures(input, m.channels.map((c) => c.name)),
    html: toneTable(input) + safety,
  };
};
