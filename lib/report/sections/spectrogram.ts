/**
 * The report section of a spectrogram: one colour map per channel, time or
 * rpm across, frequency up, level as colour; over an rpm map, the order
 * lines the analysis names (f = k·rpm/60).
 *
 * @module
 */
import type { ResultTable } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { type Figure, mapFigure } from "../figure.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers } from "../section_data.ts";

/** One colour map per channel of a tidy spectrogram. */
function spectrogramFigures(id: string, title: string, r: ResultTable): Figure[] {
  const m = resultMetadata(r, "spectrogram");
  const across = numbers(r.columns[0]);
  const frequency = numbers(r.columns[1]);
  const againstRpm = m.against === "rpm";
  const lines = across.lastIndexOf(across[0]) + 1; // rows of the first frame
  const frames = lines === 0 ? 0 : across.length / lines;
  const x = Array.from({ length: frames }, (_, j) => across[j * lines]);
  const y = Array.from(frequency.subarray(0, lines));
  const amplitude = m.kind === "rms" || m.kind === "peak";
  const orderLines = againstRpm ? m.order_lines ?? [] : [];
  return r.columns.slice(2).map((c) => {
    const v = numbers(c);
    const inDb = m.db;
    const z = x.map((_, j) =>
      v.slice(j * lines, (j + 1) * lines).map((value) =>
        inDb ? value : (amplitude ? 20 : 10) * Math.log10(value)
      )
    );
    return {
      name: `${id}_${c.name}_spectrogram`,
      ...mapFigure({
        title: `${title}: ${c.name}`,
        xLabel: againstRpm ? "Speed [rpm]" : "Time [s]",
        yLabel: "Frequency [Hz]",
        zLabel: inDb ? c.unit : `dB re 1 ${c.unit}`,
        x,
        y,
        z,
        lines: orderLines.map((k) => ({
          name: `order ${k}`,
          x,
          y: x.map((rpm) => (k * rpm) / 60),
        })),
      }),
    };
  });
}

/** The section of a spectrogram step. */
export const section: SectionBuilder = ({ step, title, result, note }) =>
  Promise.resolve({ heading: title, note, figures: spectrogramFigures(step.id, title, result) });
