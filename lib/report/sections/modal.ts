/**
 * The report section of a modal fit: the mode table, the stability chart,
 * measured against synthesised FRFs, and each mode's shape on the test
 * geometry when the plan gives one.
 *
 * @module
 */
import { formatFixed } from "../../format_number.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { escapeXml } from "../escape_xml.ts";
import { type Figure, lineFigure, withUnit } from "../figure.ts";
import type { Series } from "../plot/line_plot.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers, sideResult } from "../section_data.ts";
import { shapeFigure } from "../shape_view.ts";

/** The section of a modal step. */
export const section: SectionBuilder = async (input) => {
  const { title, result: r } = input;
  const id = input.step.id;
  const m = resultMetadata(r, "modal");
  const rows = m.modes.map((mode) =>
    `<tr><td>${escapeXml(mode.mode)}</td><td>${formatFixed(mode.frequencyHz, 2)}</td><td>${
      formatFixed(100 * mode.dampingRatio, 2)
    }</td><td>${formatFixed(mode.mpc, 3)}</td><td>${escapeXml(mode.flags.join(", "))}</td></tr>`
  ).join("\n");
  const html =
    `<table><thead><tr><th>Mode</th><th>Frequency [Hz]</th><th>Damping [%]</th><th>MPC</th><th>Flags</th></tr></thead><tbody>${rows}</tbody></table>`;
  const figures: Figure[] = [];
  const stability = await sideResult(input, "stability");
  if (stability !== undefined) {
    const [order, hz, , sf, sd, ss] = stability.columns.map(numbers);
    const pick = (test: (k: number) => boolean) => {
      const x: number[] = [], y: number[] = [];
      for (let k = 0; k < order.length; k++) {
        if (test(k)) {
          x.push(hz[k]);
          y.push(order[k]);
        }
      }
      return { x, y };
    };
    const all = (k: number) => sf[k] === 1 && sd[k] === 1 && ss[k] === 1;
    figures.push({
      name: `${id}_stability`,
      ...lineFigure({
        title: `${title}: stability over model orders`,
        x: { label: "Frequency [Hz]" },
        y: { label: "Model order [-]" },
        series: [
          { name: "stable (f, ζ, shape)", markers: true, ...pick(all) },
          { name: "stable in f only", markers: true, ...pick((k) => sf[k] === 1 && !all(k)) },
          { name: "not stable", markers: true, ...pick((k) => sf[k] !== 1) },
        ],
      }),
    });
  }
  const synth = await sideResult(input, "synth");
  if (synth !== undefined) {
    const f = numbers(synth.columns[0]);
    const series: Series[] = [];
    // Up to three points: measured solid, synthesised dashed, |H| from re and im.
    for (let d = 0; d < Math.min(3, m.dofs.length); d++) {
      const [mr, mi, sr, si] = synth.columns.slice(1 + 4 * d, 5 + 4 * d).map(numbers);
      const name = m.dofs[d].point + (m.dofs[d].direction === "" ? "" : ` ${m.dofs[d].direction}`);
      series.push({ name: `${name} measured`, x: f, y: mr.map((v, k) => Math.hypot(v, mi[k])) });
      series.push({
        name: `${name} synthesised`,
        x: f,
        y: sr.map((v, k) => Math.hypot(v, si[k])),
        dashed: true,
      });
    }
    figures.push({
      name: `${id}_synthesis`,
      ...lineFigure({
        title: `${title}: measured and synthesised receptance`,
        x: { label: "Frequency [Hz]" },
        y: { label: withUnit("|H|", synth.columns[1]?.unit ?? ""), log: true, power: false },
        series,
      }),
    });
  }
  const shapes = m.geometry !== undefined ? await sideResult(input, "shapes") : undefined;
  if (m.geometry !== undefined && shapes !== undefined) {
    const geometry = m.geometry;
    const [mode] = [shapes.columns[0]].map(numbers);
    const point = shapes.columns[1].values, direction = shapes.columns[2].values;
    const re = numbers(shapes.columns[3]), im = numbers(shapes.columns[4]);
    const index = new Map(geometry.points.map((p, i) => [p.point, i]));
    for (const fitted of m.modes) {
      const { figure } = shapeFigure(id, fitted, geometry, index, {
        mode,
        point,
        direction,
        re,
        im,
      });
      figures.push(figure);
    }
  }
  return { heading: title, note: input.note, figures, html };
};
