/**
 * The report section of a spectrum: every channel's spectrum on
 * logarithmic axes, titled with its kind, resolution, averages and window.
 *
 * @module
 */
import { formatNumber } from "../../format_number.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import type { ResultTable } from "../../io/result_file.ts";
import { type Figure, lineFigure, withUnit } from "../figure.ts";
import type { Series } from "../plot/line_plot.ts";
import type { SectionBuilder } from "../section.ts";
import { numbers } from "../section_data.ts";

function spectrumFigures(id: string, title: string, r: ResultTable): Figure[] {
  const [f, ...channels] = r.columns;
  const m = resultMetadata(r, "spectrum");
  const kind = m.kind;
  const fx = numbers(f);
  const series: Series[] = channels.map((c) => ({ name: c.name, x: fx, y: numbers(c) }));
  return [{
    name: `${id}_spectrum`,
    ...lineFigure({
      title: `${title}: ${kind}, df ${
        formatNumber(m.df_hz, 6)
      } Hz, ${m.averages} averages, ${m.window}`,
      x: { label: "Frequency [Hz]", log: true, domain: [Math.max(fx[1], 1), fx[fx.length - 1]] },
      // psd and power are powers (unit², 10 dB per decade); rms and peak amplitudes.
      y: {
        label: withUnit(kind.toUpperCase(), channels[0]?.unit ?? ""),
        log: true,
        power: kind === "psd" || kind === "power",
      },
      series,
    }),
  }];
}

/** The section of a spectrum step. */
export const section: SectionBuilder = ({ step, title, result, note }) =>
  Promise.resolve({ heading: title, note, figures: spectrumFigures(step.id, title, result) });
