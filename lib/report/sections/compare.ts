/**
 * The report section of a test-against-simulation comparison: both curves
 * overlaid, their difference, the difference per band, and the peak pairs
 * with FRAC. Its note names the two files compared.
 *
 * @module
 */
import { formatFixed, formatNumber } from "../../format_number.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { escapeXml } from "../escape_xml.ts";
import { barFigure, type Figure, lineFigure, withUnit } from "../figure.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers } from "../section_data.ts";

/** The section of a compare step. */
export const section: SectionBuilder = ({ step, title, result: r }) => {
  const id = step.id;
  const f = numbers(r.columns[0]);
  const m = resultMetadata(r, "compare");

  const figures: Figure[] = [
    {
      name: `${id}_overlay`,
      ...lineFigure({
        title: `${title}: test and simulation (FRAC ${formatFixed(m.frac, 3)})`,
        x: { label: "Frequency [Hz]", log: true },
        y: { label: withUnit("Magnitude", r.columns[1].unit), log: true, power: false },
        series: [
          { name: "test", x: f, y: numbers(r.columns[1]) },
          { name: "simulation", x: f, y: numbers(r.columns[2]), dashed: true },
        ],
      }),
    },
    {
      name: `${id}_difference`,
      ...lineFigure({
        title: `${title}: simulation − test`,
        x: { label: "Frequency [Hz]", log: true },
        y: { label: "Difference [dB]" },
        series: [{ name: "difference", x: f, y: numbers(r.columns[3]) }],
        height: 240,
      }),
    },
  ];
  const bands = m.bands ?? [];
  if (bands.length > 0) {
    figures.push({
      name: `${id}_bands`,
      ...barFigure({
        title: `${title}: simulation − test per band`,
        labels: bands.map((b) => formatNumber(b.nominal_hz, 4)),
        groups: [{
          name: "simulation − test",
          values: new Float64Array(bands.map((b) => b.difference_db ?? NaN)),
        }],
        xLabel: "Band nominal frequency [Hz]",
        yLabel: "Difference [dB]",
        baseline: 0,
        height: 280,
      }),
    });
  }
  const rows = m.peaks.map((p) =>
    `<tr><td>${formatFixed(p.test_hz, 2)}</td><td>${formatFixed(p.simulation_hz, 2)}</td><td>${
      formatFixed(p.shift_percent, 2)
    }</td><td>${formatFixed(p.level_difference_db, 2)}</td></tr>`
  ).join("");
  const html = `<p>FRAC ${formatFixed(m.frac, 4)} (on ${
    escapeXml(m.frac_on)
  } data), common grid of ${escapeXml(m.grid.lines)} lines from the ${
    escapeXml(m.grid.from)
  } curve.</p><table><thead><tr><th>Test peak [Hz]</th><th>Simulation peak [Hz]</th><th>Shift [%]</th><th>Level difference [dB]</th></tr></thead><tbody>${rows}</tbody></table>`;
  return Promise.resolve({
    heading: title,
    note: `test ${(m.test ?? "").split("/").pop()} against ${
      (m.simulation ?? "").split("/").pop()
    }`,
    figures,
    html,
  });
};
