/**
 * Line plots as standalone SVG, on linear or logarithmic axes, with the
 * legend beside or under the frame.
 *
 * @module
 */
import { axes, type Axis, labelledAxis, makeScale } from "./axes.ts";
import { frame, MARGIN, PALETTE, titleExtra } from "./frame.ts";
import { legendPlace, placedLegend } from "./legend.ts";

/** One line of a line plot. */
export interface Series {
  /** Legend label. */
  readonly name: string;
  /** x values. */
  readonly x: ArrayLike<number>;
  /** y values (non-finite values break the line). */
  readonly y: ArrayLike<number>;
  /** Dashed line (e.g. a simulation or a limit). Default false. */
  readonly dashed?: boolean;
  /** Points as markers, not joined (e.g. poles in a stability chart). Default false. */
  readonly markers?: boolean;
}

/** A line plot. */
export interface LinePlot {
  readonly title: string;
  readonly x: Axis;
  readonly y: Axis;
  readonly series: readonly Series[];
  /** Pixel size. Default 960 × 400. */
  readonly width?: number;
  readonly height?: number;
}

/**
 * A line plot as SVG.
 *
 * @example
 * ```ts
 * import { linePlot } from "./line_plot.ts";
 * const svg = linePlot({ title: "PSD", x: { label: "Frequency [Hz]", log: true }, y: { label: "PSD [Pa^2/Hz]", log: true },
 *   series: [{ name: "mic", x: [10, 100, 1000], y: [1e-3, 1e-4, 1e-6] }] });
 * if (!svg.startsWith("<svg") || !svg.includes("<path")) throw new Error();
 * ```
 */
export function linePlot(plot: LinePlot): string {
  const width = plot.width ?? 960;
  const extra = titleExtra(plot.title, width);
  const place = legendPlace(width, plot.series.length);
  const height = (plot.height ?? 400) + extra + place.height;
  // The axes end above a legend placed under the frame.
  const axesHeight = height - place.height;
  const top = MARGIN.top + extra;
  const xs = plot.series.flatMap((s) => Array.from(s.x));
  const ys = plot.series.flatMap((s) => Array.from(s.y));
  const right = place.right;
  const x = makeScale(plot.x, xs, [MARGIN.left, right]);
  const y = makeScale(plot.y, ys, [axesHeight - MARGIN.bottom, top], true);
  const yAxis = labelledAxis(plot.y, ys);
  const [xlo, xhi] = x.domain() as [number, number];
  const paths = plot.series.map((s, i) => {
    if (s.markers === true) {
      const colour = PALETTE[i % PALETTE.length];
      const dots: string[] = [];
      for (let k = 0; k < s.x.length; k++) {
        const ok = Number.isFinite(s.y[k]) && (!plot.y.log || s.y[k] > 0) &&
          (!plot.x.log || s.x[k] > 0) && s.x[k] >= xlo && s.x[k] <= xhi;
        if (ok) {
          dots.push(
            `<circle class="marker" cx="${x(s.x[k]).toFixed(1)}" cy="${
              y(s.y[k]).toFixed(1)
            }" r="2.4" fill="${colour}"/>`,
          );
        }
      }
      return dots.join("");
    }
    let d = "";
    let pen = false;
    for (let k = 0; k < s.x.length; k++) {
      const ok = Number.isFinite(s.y[k]) && (!plot.y.log || s.y[k] > 0) &&
        (!plot.x.log || s.x[k] > 0) &&
        s.x[k] >= xlo && s.x[k] <= xhi;
      if (!ok) {
        pen = false;
        continue;
      }
      d += `${pen ? "L" : "M"}${x(s.x[k]).toFixed(1)},${y(s.y[k]).toFixed(1)}`;
      pen = true;
    }
    return `<path d="${d}" fill="none" stroke="${PALETTE[i % PALETTE.length]}" stroke-width="1.6"${
      s.dashed === true ? ' stroke-dasharray="5 3"' : ""
    }/>`;
  });
  return frame(
    width,
    height,
    plot.title,
    `${axes({ x, y, xAxis: plot.x, yAxis, height: axesHeight })}\n${paths.join("\n")}\n${
      placedLegend(plot.series, place, width, height, top)
    }`,
  );
}
