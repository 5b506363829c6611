/**
 * A figure of the report: its static SVG, the same picture laid out for a
 * narrow screen, and for a line plot the data of its interactive chart; and
 * the labels and ranges the sections' plots share.
 *
 * @module
 */
import { type BarPlot, barPlot } from "./plot/bar_plot.ts";
import { type ChartSpec, chartSpec } from "./plot/chart_spec.ts";
import { type HeatMap, heatMap } from "./plot/heat_map.ts";
import { type LinePlot, linePlot } from "./plot/line_plot.ts";

/** A figure of a section, written as `figures/<name>.svg` and shown in the page. */
export interface Figure {
  readonly name: string;
  readonly svg: string;
  /**
   * The same picture laid out for a narrow screen ({@linkcode NARROW_WIDTH}
   * px, legend under the frame), shown instead of `svg` where `svg` would
   * shrink its text below 11 px.
   */
  readonly narrow?: string;
  /** For a line plot: its data for the interactive chart. */
  readonly chart?: ChartSpec;
  /** One of a set of small pictures, laid out side by side. */
  readonly small?: boolean;
  /** Markup in place of the plain SVG (a view with its own data: time_history.ts, shape_view.ts). */
  readonly html?: string;
}

/**
 * The width of a figure's narrow picture. Shown at least this wide up to a
 * 700 px window (the narrow layout's margins leave 666 px), its 11 px text
 * stays at 11 px or more.
 */
export const NARROW_WIDTH = 600;

/**
 * A line plot's static SVG (wide and narrow) and the data of its interactive chart.
 *
 * @example
 * ```ts
 * import { lineFigure } from "./figure.ts";
 * const f = lineFigure({ title: "t", x: { label: "x" }, y: { label: "y" }, series: [{ name: "a", x: [0, 1], y: [1, 2] }] });
 * if (f.narrow === undefined || !f.svg.startsWith("<svg") || f.chart.data.length !== 2) throw new Error();
 * ```
 */
export function lineFigure(plot: LinePlot): { svg: string; narrow?: string; chart: ChartSpec } {
  const wide = linePlot(plot);
  return {
    svg: wide,
    ...((plot.width ?? 960) > NARROW_WIDTH
      ? { narrow: linePlot({ ...plot, width: NARROW_WIDTH }) }
      : {}),
    chart: chartSpec(plot),
  };
}

/** A bar chart, wide and narrow. */
export function barFigure(plot: BarPlot): { svg: string; narrow: string } {
  return { svg: barPlot(plot), narrow: barPlot({ ...plot, width: NARROW_WIDTH }) };
}

/** A colour map, wide and narrow. */
export function mapFigure(plot: HeatMap): { svg: string; narrow: string } {
  return { svg: heatMap(plot), narrow: heatMap({ ...plot, width: NARROW_WIDTH }) };
}

/**
 * An axis label with its unit in brackets, or bare without one.
 *
 * @example
 * ```ts
 * import { withUnit } from "./figure.ts";
 * if (withUnit("Level", "dB") !== "Level [dB]" || withUnit("MAC", "") !== "MAC") throw new Error();
 * ```
 */
export const withUnit = (label: string, unit: string): string =>
  unit === "" ? label : `${label} [${unit}]`;

/**
 * The frequency range a logarithmic frequency axis shows: from the first
 * line above 0 Hz (at least 1 Hz) to the last.
 *
 * @example
 * ```ts
 * import { frequencyDomain } from "./figure.ts";
 * const [lo, hi] = frequencyDomain(new Float64Array([0, 0.5, 1, 1.5]));
 * if (lo !== 1 || hi !== 1.5) throw new Error();
 * ```
 */
export function frequencyDomain(f: ArrayLike<number>): [number, number] {
  return [Math.max(f[0] || f[1], 1), f[f.length - 1]];
}
