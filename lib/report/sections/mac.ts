/**
 * The report section of a shape correlation: the MAC matrix as a colour
 * grid with its values, and the table of paired modes.
 *
 * @module
 */
import { formatFixed } from "../../format_number.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { escapeXml } from "../escape_xml.ts";
import { mapFigure } from "../figure.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers } from "../section_data.ts";

/** The section of a mac step. */
export const section: SectionBuilder = ({ step, title, result: r, note }) => {
  const m = resultMetadata(r, "mac");
  const [testMode, simMode, mac] = r.columns.map(numbers);
  const tests = [...new Set(testMode)].sort((a, b) => a - b);
  const sims = [...new Set(simMode)].sort((a, b) => a - b);
  const z = sims.map((s) =>
    Float64Array.from(tests, (t) => {
      for (let k = 0; k < mac.length; k++) if (testMode[k] === t && simMode[k] === s) return mac[k];
      return NaN;
    })
  );
  const rows = m.pairs.map((p) =>
    `<tr><td>${escapeXml(p.test_mode)}</td><td>${escapeXml(p.simulation_mode)}</td><td>${
      formatFixed(p.test_hz, 2)
    }</td><td>${formatFixed(p.simulation_hz, 2)}</td><td>${
      formatFixed(p.shift_percent, 2)
    }</td><td>${formatFixed(p.mac, 3)}</td></tr>`
  ).join("\n");
  return Promise.resolve({
    heading: title,
    note,
    figures: [{
      name: `${step.id}_mac`,
      ...mapFigure({
        title: `${title}: MAC, test against simulation (${m.dofs_used} points)`,
        xLabel: "Simulation mode",
        yLabel: "Test mode",
        zLabel: "MAC [-]",
        x: sims,
        y: tests,
        z,
        zDomain: [0, 1],
        values: true,
      }),
    }],
    html:
      `<table><thead><tr><th>Test mode</th><th>Simulation mode</th><th>Test [Hz]</th><th>Simulation [Hz]</th><th>Shift [%]</th><th>MAC</th></tr></thead><tbody>${rows}</tbody></table>`,
  });
};
