/**
 * Plots as standalone SVG strings: lines on linear or logarithmic axes, bar
 * spectra, and colour maps. Axes come from d3-scale; every axis carries its
 * label with unit. The look is quiver's own: a white field, fine grey
 * grid, a slate frame, and a five-colour line palette chosen to stay
 * distinguishable in greyscale print.
 *
 * @module
 */
import { Buffer } from "node:buffer";
import { maxOf, minOf } from "../extent.ts";
import { encodePng } from "./png.ts";
// @ts-types="npm:@types/d3-scale@4.0.9"
import { type ScaleLinear, scaleLinear, scaleLog } from "npm:d3-scale@4.0.3";

/** quiver's line palette. */
export const PALETTE = ["#1d4e89", "#d1495b", "#2e8b57", "#edae49", "#6a4c93"] as const;

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

/** An axis. */
export interface Axis {
  /** Label with unit, e.g. "Frequency [Hz]". */
  readonly label: string;
  /** Logarithmic? Default false. */
  readonly log?: boolean;
  /** Fixed domain; default: the data's extent. */
  readonly domain?: readonly [number, number];
  /**
   * Logarithmic value axes: whether the values are powers (unit², 10 dB per
   * decade) or amplitudes (20 dB per decade), for the dynamic-range limit.
   * Default true.
   */
  readonly power?: boolean;
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

const MARGIN = { top: 34, right: 18, bottom: 46, left: 70 };

/** Width of the legend column right of a line plot's frame: legends never cover data. */
const LEGEND_WIDTH = 170;

/** Escapes text for SVG/HTML. *
 * @example
 * ```ts
 * import { escapeXml } from "./svg_plot.ts";
 * if (escapeXml("<b>&") !== "&lt;b&gt;&amp;" || escapeXml(5) !== "5" || escapeXml(null) !== "") throw new Error();
 * ```
 */
export function escapeXml(text: unknown): string {
  // Any value from a file (a number, null, an object where a string was expected) is
  // turned into text first, so that nothing reaches the page unescaped.
  return String(text ?? "").replace(
    /[&<>"']/g,
    (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!,
  );
}

/** The dynamic range a logarithmic value axis shows at most below its largest value. */
const DYNAMIC_RANGE_DB = 120;

/** Decades of {@linkcode DYNAMIC_RANGE_DB}: 12 for powers, 6 for amplitudes. */
function decadesShown(axis: Axis): number {
  return DYNAMIC_RANGE_DB / (axis.power === false ? 20 : 10);
}

function extent(values: number[], log: boolean): [number, number] {
  const usable = values.filter((v) => Number.isFinite(v) && (!log || v > 0));
  if (usable.length === 0) return log ? [1, 10] : [0, 1];
  let lo = minOf(usable);
  let hi = maxOf(usable);
  if (lo === hi) {
    lo = log ? lo / 2 : lo - 1;
    hi = log ? hi * 2 : hi + 1;
  }
  return [lo, hi];
}

/**
 * The domain an axis shows: the data's extent with headroom, so that no
 * line runs along the frame (5 % of the span on a linear axis, a fifth of a
 * decade on a logarithmic one), and a logarithmic axis limited to
 * {@linkcode DYNAMIC_RANGE_DB} below its largest value.
 */
function shownDomain(axis: Axis, values: number[], headroom: boolean): {
  domain: [number, number];
  clamped: boolean;
} {
  if (axis.domain !== undefined) {
    return { domain: [axis.domain[0], axis.domain[1]], clamped: false };
  }
  let [lo, hi] = extent(values, axis.log === true);
  let clamped = false;
  if (axis.log === true) {
    const decades = decadesShown(axis);
    if (hi / lo > 10 ** decades) {
      lo = hi / 10 ** decades;
      clamped = true;
    }
    if (headroom) hi *= 10 ** 0.2;
  } else if (headroom) {
    hi += 0.05 * (hi - lo);
  }
  return { domain: [lo, hi], clamped };
}

function makeScale(axis: Axis, values: number[], range: [number, number], headroom = false) {
  const { domain } = shownDomain(axis, values, headroom);
  return axis.log === true
    ? scaleLog().domain(domain).range(range).clamp(true)
    : scaleLinear().domain(domain).range(range).nice();
}

/** Labels for a linear scale's ticks with the precision of their step (ASCII minus sign). */
function linearTickLabel(
  scale: ReturnType<typeof makeScale>,
  count: number,
): (v: number) => string {
  const format = (scale as ScaleLinear<number, number>).tickFormat(count);
  return (v: number) => format(v).replace("\u2212", "-");
}

/** A value for a tooltip: 4 significant digits. */
function formatTick(v: number): string {
  return Number(v.toPrecision(4)).toString();
}

function tickLabel(v: number): string {
  const a = Math.abs(v);
  if (a === 0) return "0";
  if (a >= 1e5 || a < 1e-3) return v.toExponential(0);
  return Number(v.toPrecision(3)).toString();
}

/** The title in lines that fit `width` px (about 7 px per character at 13 px). */
function titleLines(title: string, width: number): string[] {
  const fit = Math.max(30, Math.floor((width - MARGIN.left - 10) / 7));
  const lines: string[] = [];
  let line = "";
  for (const word of title.split(" ")) {
    if (line !== "" && line.length + 1 + word.length > fit) {
      lines.push(line);
      line = word;
    } else line = line === "" ? word : `${line} ${word}`;
  }
  lines.push(line);
  return lines;
}

/** Extra top margin a wrapped title needs. */
function titleExtra(title: string, width: number): number {
  return 16 * (titleLines(title, width).length - 1);
}

function frame(width: number, height: number, title: string, body: string): string {
  const lines = titleLines(title, width);
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-label="${
    escapeXml(title)
  }" font-family="Helvetica, Arial, sans-serif" font-size="11">
<rect width="${width}" height="${height}" fill="#ffffff"/>
<text x="${MARGIN.left}" y="20" font-size="13" font-weight="600" fill="#22313f">${
    lines.map((l, i) =>
      `<tspan x="${MARGIN.left}" dy="${i === 0 ? 0 : 16}">${escapeXml(l)}</tspan>`
    )
      .join("")
  }</text>
${body}
</svg>`;
}

function axes(
  { x, y, xAxis, yAxis, height }: {
    x: ReturnType<typeof makeScale>;
    y: ReturnType<typeof makeScale>;
    xAxis: Axis;
    yAxis: Axis;
    height: number;
  },
): string {
  const [x0, x1] = x.range();
  const [y0, y1] = y.range();
  const parts: string[] = [];
  const xTicks = xAxis.log === true
    ? logTicks(x.domain() as [number, number])
    : (x.ticks(8) as number[]);
  const yTicks = yAxis.log === true
    ? logTicks(y.domain() as [number, number])
    : (y.ticks(6) as number[]);
  // Linear ticks are labelled with the precision their step needs (d3's tickFormat), so that
  // labels of a narrow range stay distinct (66.05, 66.10, … rather than 66.1, 66.1, …).
  const xLabel = xAxis.log === true ? tickLabel : linearTickLabel(x, 8);
  const yLabel = yAxis.log === true ? tickLabel : linearTickLabel(y, 6);
  for (const t of xTicks) {
    const px = x(t);
    parts.push(`<line x1="${px}" x2="${px}" y1="${y1}" y2="${y0}" stroke="#e3e7ec"/>`);
    parts.push(
      `<text x="${px}" y="${y0 + 14}" text-anchor="middle" fill="#3d4b59">${xLabel(t)}</text>`,
    );
  }
  for (const t of yTicks) {
    const py = y(t);
    parts.push(`<line x1="${x0}" x2="${x1}" y1="${py}" y2="${py}" stroke="#e3e7ec"/>`);
    parts.push(
      `<text class="y-tick" x="${x0 - 6}" y="${py + 4}" text-anchor="end" fill="#3d4b59">${
        yLabel(t)
      }</text>`,
    );
  }
  parts.push(
    `<rect x="${x0}" y="${y1}" width="${x1 - x0}" height="${
      y0 - y1
    }" fill="none" stroke="#5b6b7b"/>`,
  );
  parts.push(
    `<text x="${(x0 + x1) / 2}" y="${height - 8}" text-anchor="middle" fill="#22313f">${
      escapeXml(xAxis.label)
    }</text>`,
  );
  parts.push(
    `<text transform="translate(16 ${
      (y0 + y1) / 2
    }) rotate(-90)" text-anchor="middle" fill="#22313f">${escapeXml(yAxis.label)}</text>`,
  );
  return parts.join("\n");
}

/** Decade and 2/5 ticks for a log axis, thinned to at most about 12. */
function logTicks([lo, hi]: [number, number]): number[] {
  const ticks: number[] = [];
  const decades = Math.log10(hi / lo);
  const steps = decades > 5 ? [1] : decades > 2 ? [1, 2, 5] : [1, 2, 3, 5];
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
    for (const m of steps) {
      const v = m * 10 ** e;
      if (v >= lo * 0.999 && v <= hi * 1.001) ticks.push(v);
    }
  }
  return ticks;
}

/** One legend entry: a line (solid or dashed), or the mark of bars over a limit. */
interface LegendEntry {
  readonly name: string;
  readonly dashed?: boolean;
  readonly colour?: string;
  /** The entry explains the over-limit marking (hatched bar and warning mark). */
  readonly over?: boolean;
}

/** Plots narrower than this put their legend under the frame, where it does not squeeze the data. */
const LEGEND_BESIDE_MIN_WIDTH = 720;

/** Height of one legend row. */
const LEGEND_ROW = 16;

/**
 * Where a plot of `width` px puts its legend: beside the frame in a column
 * of {@linkcode LEGEND_WIDTH} (wide plots), or under it in rows of columns
 * (narrow plots), with the extra height that takes.
 */
function legendPlace(width: number, entries: number): {
  right: number;
  below: boolean;
  columns: number;
  height: number;
} {
  if (width >= LEGEND_BESIDE_MIN_WIDTH || entries === 0) {
    return {
      right: width - MARGIN.right - (entries === 0 ? 0 : LEGEND_WIDTH),
      below: false,
      columns: 1,
      height: 0,
    };
  }
  const columns = Math.max(1, Math.floor((width - MARGIN.left - MARGIN.right) / 230));
  return {
    right: width - MARGIN.right,
    below: true,
    columns,
    height: LEGEND_ROW * Math.ceil(entries / columns) + 8,
  };
}

/**
 * Diagonal hatching (45°) inside a rectangle, as one path: the lines of
 * u + v = c cut to the rectangle, so no clipping element (and no id shared
 * between the pictures of one page) is needed.
 */
function hatchPath(x: number, y: number, w: number, h: number, spacing = 5): string {
  let d = "";
  for (let c = x + y + spacing; c < x + w + y + h; c += spacing) {
    const u1 = Math.max(x, c - (y + h)), u2 = Math.min(x + w, c - y);
    if (u2 <= u1) continue;
    d += `M${u1.toFixed(1)},${(c - u1).toFixed(1)}L${u2.toFixed(1)},${(c - u2).toFixed(1)}`;
  }
  return d;
}

/** Hatching that reads on any bar colour and in greyscale: a light line under a dark one. */
function hatching(x: number, y: number, w: number, h: number): string {
  const d = hatchPath(x, y, w, h);
  if (d === "") return "";
  return `<path class="hatch" d="${d}" stroke="#ffffff" stroke-width="2.4" fill="none"/><path class="hatch" d="${d}" stroke="#22313f" stroke-width="1" fill="none"/>`;
}

/** The over-limit mark: a red triangle with a white bar and dot, its tip at (x, y − size). */
function overMark(x: number, y: number, size = 13): string {
  const h = size * 0.9, half = size / 2;
  return `<g class="failing-mark"><path d="M${x.toFixed(1)},${(y - h).toFixed(1)}L${
    (x + half).toFixed(1)
  },${y.toFixed(1)}L${(x - half).toFixed(1)},${
    y.toFixed(1)
  }Z" fill="#b02e1f" stroke="#22313f" stroke-width="0.8"/><rect x="${(x - 0.8).toFixed(1)}" y="${
    (y - h * 0.68).toFixed(1)
  }" width="1.6" height="${(h * 0.4).toFixed(1)}" fill="#ffffff"/><rect x="${
    (x - 0.8).toFixed(1)
  }" y="${(y - h * 0.2).toFixed(1)}" width="1.6" height="1.6" fill="#ffffff"/></g>`;
}

function legend(
  names: readonly LegendEntry[],
  x: number,
  y: number,
  columns = 1,
  columnWidth = 0,
): string {
  // Entries stacked in a column that starts at x, outside the frame (or in rows under it on a
  // narrow plot); long names are shortened on the picture and given whole in a tooltip.
  const longest = columns > 1 ? Math.max(12, Math.floor((columnWidth - 30) / 6.2)) : 24;
  return names.map((s, i) => {
    const shown = s.name.length > longest ? `${s.name.slice(0, longest - 1)}…` : s.name;
    const at = `translate(${x + (i % columns) * columnWidth} ${
      y + 6 + LEGEND_ROW * Math.floor(i / columns)
    })`;
    const key = s.over === true
      ? `<rect x="1" y="-6" width="16" height="12" fill="#9aa5b1" stroke="#b02e1f" stroke-width="2"/>${
        hatching(1, -6, 16, 12)
      }${overMark(28, 6, 11)}`
      : `<line x1="0" x2="18" y1="0" y2="0" stroke="${
        s.colour ?? PALETTE[i % PALETTE.length]
      }" stroke-width="2"${s.dashed === true ? ' stroke-dasharray="5 3"' : ""}/>`;
    return `<g class="legend-entry${
      s.over === true ? " legend-over" : ""
    }" transform="${at}"><title>${escapeXml(s.name)}</title>${key}<text x="${
      s.over === true ? 40 : 24
    }" y="4" fill="#22313f">${escapeXml(shown)}</text></g>`;
  }).join("\n");
}

/** The legend where {@linkcode legendPlace} put it, for a plot of `width` × `height` px. */
function placedLegend(
  entries: readonly LegendEntry[],
  place: ReturnType<typeof legendPlace>,
  width: number,
  height: number,
  top: number,
): string {
  if (!place.below) return legend(entries, place.right + 12, top);
  const columnWidth = (width - MARGIN.left - MARGIN.right) / place.columns;
  return legend(entries, MARGIN.left, height - place.height + 4, place.columns, columnWidth);
}

/**
 * A line plot as SVG.
 *
 * @example
 * ```ts
 * import { linePlot } from "./svg_plot.ts";
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

/** The axis with its label saying when a logarithmic range was limited. */
function labelledAxis(axis: Axis, values: number[]): Axis {
  return shownDomain(axis, values, true).clamped
    ? { ...axis, label: `${axis.label}, top ${DYNAMIC_RANGE_DB} dB shown` }
    : axis;
}

/**
 * A value axis's label on either scale and the bottom of its logarithmic
 * view, for the chart's linear/logarithmic switch: on a linear scale nothing
 * is cut, so the label drops the "top 120 dB shown" that a limited
 * logarithmic scale carries.
 */
function switchedLabels(axis: Axis, values: number[]): {
  labels: { linear: string; log: string };
  logMin: number;
} {
  // A linear axis's fixed range (e.g. coherence 0 … 1) is no logarithmic range: the data's is.
  const asLog: Axis = { ...axis, log: true, domain: axis.log === true ? axis.domain : undefined };
  const { domain } = shownDomain(asLog, values, true);
  return {
    labels: { linear: axis.label, log: labelledAxis(asLog, values).label },
    logMin: domain[0],
  };
}

/** A line plot's data and look for the report's interactive chart (JSON-ready). */
export interface ChartSpec {
  readonly title: string;
  readonly height: number;
  readonly x: { label: string; unit: string; log: boolean; min: number; max: number };
  readonly y: {
    label: string;
    unit: string;
    log: boolean;
    min: number;
    max: number;
    /** The label on a linear and on a logarithmic scale (the reader may switch). */
    labels: { linear: string; log: string };
    /** The bottom of the logarithmic scale: the top 120 dB of the data. */
    logMin: number;
  };
  readonly series: readonly { name: string; colour: string; dashed: boolean; markers: boolean }[];
  /** x, then one y array per series, all on x; null where a series has no value. */
  readonly data: readonly (readonly (number | null)[])[];
  /** Whether lines join across missing values (series on different x grids). */
  readonly spanGaps: boolean;
}

/** The unit in the last brackets of an axis label, "" without. */
function unitOfLabel(label: string): string {
  return /\[([^\]]*)\][^\[]*$/.exec(label)?.[1] ?? "";
}

/** Numbers rounded to 6 significant digits for the JSON a report carries. */
const compact = (v: number): number | null => Number.isFinite(v) ? Number(v.toPrecision(6)) : null;

/**
 * The data and look of a line plot for the report's interactive chart: the
 * same series, colours, axis labels and shown ranges as {@linkcode linePlot}.
 *
 * @example
 * ```ts
 * import { chartSpec } from "./svg_plot.ts";
 * const spec = chartSpec({ title: "PSD", x: { label: "Frequency [Hz]", log: true }, y: { label: "PSD [Pa^2/Hz]", log: true },
 *   series: [{ name: "mic", x: [10, 100, 1000], y: [1e-3, 1e-4, 1e-6] }] });
 * if (spec.y.unit !== "Pa^2/Hz" || spec.data[1][1] !== 1e-4 || spec.x.min !== 10) throw new Error();
 * ```
 */
export function chartSpec(plot: LinePlot): ChartSpec {
  const xs = plot.series.flatMap((s) => Array.from(s.x));
  const ys = plot.series.flatMap((s) => Array.from(s.y));
  const xDomain = shownDomain(plot.x, xs, false).domain;
  const yDomain = shownDomain(plot.y, ys, true).domain;
  const first = plot.series[0]?.x ?? [];
  const aligned = plot.series.every((s) =>
    s.x.length === first.length && Array.from(s.x).every((v, k) => v === first[k])
  );
  let data: (number | null)[][];
  if (aligned) {
    data = [Array.from(first, compact), ...plot.series.map((s) => Array.from(s.y, compact))];
  } else {
    // One x axis for all: the union of the series' x values, each series null elsewhere.
    const grid = [...new Set(xs.filter(Number.isFinite))].sort((a, b) => a - b);
    const at = new Map(grid.map((v, k) => [v, k]));
    data = [grid.map(compact)];
    for (const s of plot.series) {
      const column: (number | null)[] = grid.map(() => null);
      for (let k = 0; k < s.x.length; k++) {
        const index = at.get(s.x[k]);
        if (index !== undefined) column[index] = compact(s.y[k]);
      }
      data.push(column);
    }
  }
  return {
    title: plot.title,
    height: plot.height ?? 400,
    x: {
      label: plot.x.label,
      unit: unitOfLabel(plot.x.label),
      log: plot.x.log === true,
      min: xDomain[0],
      max: xDomain[1],
    },
    y: {
      label: labelledAxis(plot.y, ys).label,
      unit: unitOfLabel(plot.y.label),
      log: plot.y.log === true,
      min: yDomain[0],
      max: yDomain[1],
      ...switchedLabels(plot.y, ys),
    },
    series: plot.series.map((s, i) => ({
      name: s.name,
      colour: PALETTE[i % PALETTE.length],
      dashed: s.dashed === true,
      markers: s.markers === true,
    })),
    data,
    spanGaps: !aligned,
  };
}

/** The plot area's outline and the two axis labels, for a plot area ending at `right` px from the edge. */
function plotFrame(
  { width, height, right, xLabel, yLabel, top = MARGIN.top }: {
    width: number;
    height: number;
    right: number;
    xLabel: string;
    yLabel: string;
    top?: number;
  },
): string {
  return [
    `<rect x="${MARGIN.left}" y="${top}" width="${width - right - MARGIN.left}" height="${
      height - top - MARGIN.bottom
    }" fill="none" stroke="#5b6b7b"/>`,
    `<text x="${(MARGIN.left + width - right) / 2}" y="${
      height - 8
    }" text-anchor="middle" fill="#22313f">${escapeXml(xLabel)}</text>`,
    `<text transform="translate(16 ${
      (height - MARGIN.bottom + top) / 2
    }) rotate(-90)" text-anchor="middle" fill="#22313f">${escapeXml(yLabel)}</text>`,
  ].join("\n");
}

/** A bar spectrum (e.g. one-third-octave levels). */
export interface BarPlot {
  readonly title: string;
  /** Bar labels (nominal frequencies). */
  readonly labels: readonly string[];
  /** One value list per group (channel). */
  readonly groups: readonly { name: string; values: ArrayLike<number> }[];
  readonly xLabel: string;
  readonly yLabel: string;
  readonly width?: number;
  readonly height?: number;
  /**
   * Bars start here (e.g. 0 for differences, which may be negative). Default:
   * the bottom of the axis, 10 below the lowest value rounded down to tens.
   */
  readonly baseline?: number;
  /**
   * Limit curves over the bars: a value per label (null outside the curve's
   * range), drawn as a dashed step line; the bars that break it are outlined,
   * hatched and marked with a warning triangle, and the legend says so.
   * Default none.
   */
  readonly limits?: readonly {
    readonly name: string;
    /** The group (channel) the limit applies to; default every group. */
    readonly group?: string;
    readonly values: readonly (number | null)[];
    readonly failing: readonly boolean[];
  }[];
}

/**
 * Grouped bars as SVG.
 *
 * @example
 * ```ts
 * import { barPlot } from "./svg_plot.ts";
 * const svg = barPlot({ title: "thirds", labels: ["100", "125"], groups: [{ name: "mic", values: [60, 62] }], xLabel: "Band [Hz]", yLabel: "Level [dB]" });
 * if ((svg.match(/<rect class="bar"/g) ?? []).length !== 2) throw new Error();
 * ```
 */
export function barPlot(plot: BarPlot): string {
  const width = plot.width ?? 960;
  const extra = titleExtra(plot.title, width);
  const limits = plot.limits ?? [];
  const anyFailing = limits.some((l) => l.failing.some((f) => f));
  const entries: LegendEntry[] = [
    ...plot.groups,
    ...limits.map((l) => ({ name: l.name, dashed: true, colour: "#22313f" })),
    ...(anyFailing ? [{ name: "over the limit", over: true }] : []),
  ];
  const place = legendPlace(width, entries.length);
  const height = (plot.height ?? 400) + extra + place.height;
  const axesHeight = height - place.height;
  const top = MARGIN.top + extra;
  const right = place.right;
  const limitValues = limits.flatMap((l) => l.values.filter((v) => v !== null));
  const values = [...plot.groups.flatMap((g) => Array.from(g.values)), ...limitValues]
    .filter(Number.isFinite) as number[];
  const lo = minOf(values);
  const hi = maxOf(values);
  const baseline = plot.baseline;
  // Headroom above the highest value for the over-limit marks.
  const domain: [number, number] = baseline === undefined
    ? [Math.floor((lo - 10) / 10) * 10, Math.ceil((hi + (anyFailing ? 8 : 5)) / 10) * 10]
    : [Math.min(baseline, lo), Math.max(baseline, hi)];
  const y = scaleLinear().domain(domain).range([axesHeight - MARGIN.bottom, top]);
  if (baseline !== undefined) y.nice();
  const base = baseline === undefined ? axesHeight - MARGIN.bottom : y(baseline);
  const x = scaleLinear().domain([0, plot.labels.length]).range([MARGIN.left, right]);
  const slot = x(1) - x(0);
  const barWidth = (0.8 * slot) / plot.groups.length;
  const parts: string[] = [];
  for (const t of y.ticks(6)) {
    parts.push(
      `<line x1="${MARGIN.left}" x2="${right}" y1="${y(t)}" y2="${y(t)}" stroke="#e3e7ec"/>`,
    );
    parts.push(
      `<text x="${MARGIN.left - 6}" y="${y(t) + 4}" text-anchor="end" fill="#3d4b59">${
        tickLabel(t)
      }</text>`,
    );
  }
  // Band labels at least 36 px apart (a five-digit label at 11 px is about 32 px wide).
  const every = Math.max(1, Math.ceil(36 / slot));
  // A bar fails when a limit on its group (or on every group) is broken in its band.
  const failsAt = (i: number, group: string) =>
    limits.some((l) => (l.group === undefined || l.group === group) && l.failing[i] === true);
  const marks: string[] = [];
  plot.labels.forEach((label, i) => {
    if (i % every === 0) {
      parts.push(
        `<text x="${x(i + 0.5)}" y="${
          axesHeight - MARGIN.bottom + 14
        }" text-anchor="middle" fill="#3d4b59">${escapeXml(label)}</text>`,
      );
    }
    plot.groups.forEach((g, j) => {
      const v = g.values[i];
      if (!Number.isFinite(v)) return;
      const end = y(v);
      const fails = failsAt(i, g.name);
      const bx = x(i) + 0.1 * slot + j * barWidth;
      const by = Math.min(end, base), bh = Math.abs(base - end);
      parts.push(
        `<rect class="bar${fails ? " failing" : ""}" x="${bx.toFixed(1)}" y="${
          by.toFixed(1)
        }" width="${barWidth.toFixed(1)}" height="${bh.toFixed(1)}" fill="${
          PALETTE[j % PALETTE.length]
        }"${fails ? ' stroke="#b02e1f" stroke-width="2"' : ""}><title>${
          escapeXml(
            `${g.name}, ${label}: ${formatTick(v)} (${plot.yLabel})${
              fails ? ", over the limit" : ""
            }`,
          )
        }</title></rect>`,
      );
      if (fails) {
        parts.push(overBar(bx, by, barWidth, bh));
        // The mark stands above the bar and the limit, whichever is higher.
        const limitTop = limits.reduce(
          (
            t,
            l,
          ) => (l.values[i] !== null && Number.isFinite(l.values[i])
            ? Math.min(t, y(l.values[i]!))
            : t),
          by,
        );
        marks.push(overMark(bx + barWidth / 2, Math.min(by, limitTop) - 3));
      }
    });
  });
  // Limit curves as dashed steps across each band's slot.
  limits.forEach((limit) => {
    let d = "";
    limit.values.forEach((v, i) => {
      if (v === null || !Number.isFinite(v)) return;
      d += `M${x(i).toFixed(1)},${y(v).toFixed(1)}L${x(i + 1).toFixed(1)},${y(v).toFixed(1)}`;
    });
    parts.push(
      `<path class="limit" d="${d}" fill="none" stroke="#22313f" stroke-width="1.6" stroke-dasharray="6 3"><title>${
        escapeXml(limit.name)
      }</title></path>`,
    );
  });
  parts.push(...marks);
  parts.push(
    plotFrame({
      width,
      height: axesHeight,
      top,
      right: width - right,
      xLabel: plot.xLabel,
      yLabel: plot.yLabel,
    }),
  );
  return frame(
    width,
    height,
    plot.title,
    parts.join("\n") + placedLegend(entries, place, width, height, top),
  );
}

/** A failing bar's hatching (the bar keeps its group colour underneath). */
function overBar(x: number, y: number, w: number, h: number): string {
  return h >= 2 && w >= 2 ? hatching(x, y, w, h) : "";
}

/**
 * quiver's colour ramp for maps (own choice): night indigo → violet → lake
 * blue → sea green → lime → pale straw. Its CIE L* rises steadily from about
 * 8 to 92 along the ramp, so a map reads in greyscale and without telling
 * red from green.
 */
const RAMP = ["#1a1038", "#3a2c7a", "#2d6a8e", "#2f9a7c", "#86c35a", "#f1ea9c"];

/**
 * The map colour at u in [0, 1] (clamped: values outside the colour bar's
 * range take its end colours, as the colour bar shows).
 *
 * @example
 * ```ts
 * import { mapColour } from "./svg_plot.ts";
 * if (mapColour(0) !== "rgb(26,16,56)" || mapColour(1) !== "rgb(241,234,156)") throw new Error();
 * ```
 */
export function mapColour(u: number): string {
  return `rgb(${mapRgb(u).join(",")})`;
}

const RAMP_RGB = RAMP.map((h) => [1, 3, 5].map((k) => parseInt(h.slice(k, k + 2), 16)));

/** The map colour at u in [0, 1] as 8-bit red, green, blue (clamped as {@linkcode mapColour}). */
function mapRgb(u: number): [number, number, number] {
  const t = Math.min(1, Math.max(0, u)) * (RAMP.length - 1);
  const i = Math.min(RAMP.length - 2, Math.floor(t));
  const f = t - i;
  const a = RAMP_RGB[i], b = RAMP_RGB[i + 1];
  return [0, 1, 2].map((k) => Math.round(a[k] + f * (b[k] - a[k]))) as [number, number, number];
}

/** Most image pixels a colour map keeps across and up; beyond, cells merge. */
export const MAP_PIXELS = { across: 720, up: 400 } as const;

/**
 * The cells of a map as one PNG image in a clipping viewport. Where the grid
 * has more cells than {@linkcode MAP_PIXELS}, neighbouring cells merge and a
 * pixel shows the highest of them, so a narrow peak (an order, a tone) is
 * never averaged away. Non-finite cells are white.
 */
function mapImage(
  z: readonly ArrayLike<number>[],
  rows: number,
  domain: readonly [number, number],
  area: { x: number; y: number; width: number; height: number },
  readout = "",
): string {
  const columns = z.length;
  const fx = Math.ceil(columns / MAP_PIXELS.across);
  const fy = Math.ceil(rows / MAP_PIXELS.up);
  const across = Math.ceil(columns / fx), up = Math.ceil(rows / fy);
  const rgb = new Uint8Array(across * up * 3);
  for (let a = 0; a < across; a++) {
    for (let b = 0; b < up; b++) {
      let best = -Infinity;
      for (let i = a * fx; i < Math.min(columns, (a + 1) * fx); i++) {
        for (let j = b * fy; j < Math.min(rows, (b + 1) * fy); j++) {
          if (Number.isFinite(z[i][j]) && z[i][j] > best) best = z[i][j];
        }
      }
      // Image rows run from the top: block b of rows is pixel row up − 1 − b.
      const at = ((up - 1 - b) * across + a) * 3;
      rgb.set(
        best === -Infinity ? [255, 255, 255] : mapRgb((best - domain[0]) / (domain[1] - domain[0])),
        at,
      );
    }
  }
  const png = encodeBase64(encodePng(across, up, rgb));
  // viewBox in cells (y down); the last, partly filled block may overhang and is clipped.
  return `<svg class="map"${readout} x="${area.x.toFixed(1)}" y="${area.y.toFixed(1)}" width="${
    area.width.toFixed(1)
  }" height="${
    area.height.toFixed(1)
  }" viewBox="0 0 ${columns} ${rows}" preserveAspectRatio="none" overflow="hidden"><image x="0" y="${
    rows - up * fy
  }" width="${across * fx}" height="${
    up * fy
  }" preserveAspectRatio="none" style="image-rendering:pixelated" href="data:image/png;base64,${png}"/></svg>`;
}

function encodeBase64(bytes: Uint8Array): string {
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString("base64");
}

/** A colour map of z over a regular (x, y) grid, e.g. level against rpm and order. */
export interface HeatMap {
  readonly title: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly zLabel: string;
  /** x of each column (e.g. rpm steps). */
  readonly x: readonly number[];
  /** y of each row (e.g. orders). */
  readonly y: readonly number[];
  /** z[column][row]. */
  readonly z: readonly (ArrayLike<number>)[];
  /** Colour range; default: the top 50 units of the data (for dB). */
  readonly zDomain?: readonly [number, number];
  /** Print each cell's value in it (small grids such as a MAC matrix). Default false. */
  readonly values?: boolean;
  /** Lines drawn over the map in data units (e.g. order lines), clipped to the map. */
  readonly lines?: readonly { name: string; x: ArrayLike<number>; y: ArrayLike<number> }[];
  readonly width?: number;
  readonly height?: number;
}

/**
 * A colour map as SVG, with a colour bar.
 *
 * @example
 * ```ts
 * import { heatMap } from "./svg_plot.ts";
 * const svg = heatMap({ title: "map", xLabel: "rpm", yLabel: "order", zLabel: "dB", x: [1000, 1100], y: [0, 1, 2], z: [[1, 2, 3], [3, 2, 1]] });
 * if (!svg.includes('viewBox="0 0 2 3"') || !svg.includes("data:image/png;base64,iVBORw0KGgo")) throw new Error();
 * ```
 */
export function heatMap(plot: HeatMap): string {
  const width = plot.width ?? 720;
  // A title wrapped on a narrow map pushes the map down, never over it.
  const extra = titleExtra(plot.title, width);
  const height = (plot.height ?? 380) + extra;
  const top = MARGIN.top + extra;
  const right = MARGIN.right + 66;
  let lowest = Infinity, highest = -Infinity;
  for (const col of plot.z) {
    for (let j = 0; j < col.length; j++) {
      if (Number.isFinite(col[j])) {
        lowest = Math.min(lowest, col[j]);
        highest = Math.max(highest, col[j]);
      }
    }
  }
  const domain = plot.zDomain ?? [Math.max(lowest, highest - 50), highest];
  const x = scaleLinear().domain([0, plot.x.length]).range([MARGIN.left, width - right]);
  const y = scaleLinear().domain([0, plot.y.length]).range([height - MARGIN.bottom, top]);
  // What the report's script needs to read a cell under the pointer: the axes' first and last
  // cell centres, the grid size, and the colour bar's range and ramp (a colour names its value,
  // as the ramp is monotone in lightness).
  const attribute = (name: string, value: unknown) => ` data-${name}="${escapeXml(value)}"`;
  const readout = [
    attribute("x", `${plot.x[0]},${plot.x[plot.x.length - 1]},${plot.x.length}`),
    attribute("y", `${plot.y[0]},${plot.y[plot.y.length - 1]},${plot.y.length}`),
    attribute("z", `${domain[0]},${domain[1]}`),
    attribute("ramp", RAMP.join(",")),
    attribute("labels", JSON.stringify([plot.xLabel, plot.yLabel, plot.zLabel])),
  ].join("");
  const parts: string[] = [mapImage(plot.z, plot.y.length, domain, {
    x: x(0),
    y: y(plot.y.length),
    width: x(plot.x.length) - x(0),
    height: y(0) - y(plot.y.length),
  }, readout)];
  const xs = scaleLinear().domain([plot.x[0], plot.x[plot.x.length - 1]]).range([
    x(0.5),
    x(plot.x.length - 0.5),
  ]);
  // A small grid of categories (mode numbers) is labelled cell by cell, a large one by ticks.
  const xTicks = plot.values === true ? plot.x : xs.ticks(width < LEGEND_BESIDE_MIN_WIDTH ? 5 : 8);
  xTicks.forEach((t, i) => {
    const at = plot.values === true ? x(i + 0.5) : xs(t);
    parts.push(
      `<text x="${at}" y="${height - MARGIN.bottom + 14}" text-anchor="middle" fill="#3d4b59">${
        tickLabel(t)
      }</text>`,
    );
  });
  const ys = scaleLinear().domain([plot.y[0], plot.y[plot.y.length - 1]]).range([
    y(0.5),
    y(plot.y.length - 0.5),
  ]);
  const yTicks = plot.values === true ? plot.y : ys.ticks(6);
  yTicks.forEach((t, j) => {
    const at = plot.values === true ? y(j + 0.5) : ys(t);
    parts.push(
      `<text x="${MARGIN.left - 6}" y="${at + 4}" text-anchor="end" fill="#3d4b59">${
        tickLabel(t)
      }</text>`,
    );
  });
  const barX = width - right + 10;
  const zs = scaleLinear().domain(domain as [number, number]).range([
    height - MARGIN.bottom,
    top,
  ]);
  for (let k = 0; k < 40; k++) {
    const y0 = top + ((height - MARGIN.bottom - top) * k) / 40;
    parts.push(
      `<rect x="${barX}" y="${y0.toFixed(1)}" width="14" height="${
        ((height - MARGIN.bottom - top) / 40 + 0.5).toFixed(1)
      }" fill="${mapColour(1 - k / 40)}"/>`,
    );
  }
  for (const t of zs.ticks(5)) {
    parts.push(`<text x="${barX + 18}" y="${zs(t) + 4}" fill="#3d4b59">${tickLabel(t)}</text>`);
  }
  // The colour bar's title runs up beside its tick labels, so a long unit fits the margin.
  parts.push(
    `<text transform="translate(${width - 6} ${
      (height - MARGIN.bottom + top) / 2
    }) rotate(-90)" text-anchor="middle" fill="#22313f">${escapeXml(plot.zLabel)}</text>`,
  );
  const area = { x0: x(0), x1: x(plot.x.length), y0: y(plot.y.length), y1: y(0) };
  for (const line of plot.lines ?? []) parts.push(overlayLine(line, xs, ys, area));
  if (plot.values === true) {
    plot.z.forEach((col, i) => {
      for (let j = 0; j < plot.y.length; j++) {
        const light = (col[j] - domain[0]) / (domain[1] - domain[0]) > 0.6;
        parts.push(
          `<text class="value" x="${x(i + 0.5).toFixed(1)}" y="${
            (y(j + 0.5) + 4).toFixed(1)
          }" text-anchor="middle" fill="${light ? "#1a1038" : "#ffffff"}">${
            Number.isFinite(col[j]) ? col[j].toFixed(2) : ""
          }</text>`,
        );
      }
    });
  }
  parts.push(plotFrame({ width, height, right, top, xLabel: plot.xLabel, yLabel: plot.yLabel }));
  return frame(width, height, plot.title, parts.join("\n"));
}

/**
 * A polyline over a map, clipped to the map's y range (linear between
 * points) and labelled at its last point inside.
 */
function overlayLine(
  line: { name: string; x: ArrayLike<number>; y: ArrayLike<number> },
  xs: (v: number) => number,
  ys: ScaleLinear<number, number>,
  area: MapArea,
): string {
  const [lo, hi] = ys.domain() as [number, number];
  const points: [number, number][] = [];
  for (let k = 0; k < line.x.length; k++) {
    const x = line.x[k], y = line.y[k];
    const inside = y >= lo && y <= hi;
    if (k > 0) {
      // Where the segment from the previous point crosses an edge, a point on the edge.
      const px = line.x[k - 1], py = line.y[k - 1];
      for (const edge of [lo, hi]) {
        if ((py - edge) * (y - edge) < 0) {
          points.push([px + ((edge - py) / (y - py)) * (x - px), edge]);
        }
      }
    }
    if (inside) points.push([x, y]);
  }
  if (points.length < 2) return "";
  return overlayGuides(line.name, points.map(([x, y]) => [xs(x), ys(y)]), area);
}

/** The map's rectangle in the picture, px (y0 its top). */
interface MapArea {
  readonly x0: number;
  readonly x1: number;
  readonly y0: number;
  readonly y1: number;
}

/** Gap between an order line's ridge and each of its guides, px. */
const GUIDE_GAP = 6;

/**
 * An order line drawn so that the ridge it marks stays in view: two thin
 * dashed guides offset either side of it (never over it), and its name
 * beside its last point, on the side with room inside the map.
 */
function overlayGuides(
  name: string,
  pixels: readonly [number, number][],
  area: MapArea,
): string {
  const top = area.y0, bottom = area.y1;
  // Each vertex moved along the normal of its neighbours' chord (exact for a straight line).
  const shifted = (gap: number) =>
    pixels.map(([x, y], i) => {
      const [ax, ay] = pixels[Math.max(0, i - 1)],
        [bx, by] = pixels[Math.min(pixels.length - 1, i + 1)];
      const length = Math.hypot(bx - ax, by - ay) || 1;
      return [x + (gap * (by - ay)) / length, y - (gap * (bx - ax)) / length] as [number, number];
    });
  const path = (p: [number, number][]) =>
    p.map(([x, y], i) => `${i === 0 ? "M" : "L"}${x.toFixed(1)},${y.toFixed(1)}`).join("");
  const [lx, ly] = pixels[pixels.length - 1];
  const [px, py] = pixels[pixels.length - 2];
  // The upper side (the normal that points up the page) if the label fits there, else the lower.
  const length = Math.hypot(lx - px, ly - py) || 1;
  const up = [(ly - py) / length, -(lx - px) / length];
  const sign = up[1] <= 0 ? 1 : -1;
  const away = GUIDE_GAP + 9;
  let side = sign;
  if (ly + side * away * up[1] - 10 < top || ly + side * away * up[1] + 4 > bottom) side = -side;
  const tx = lx + side * away * up[0] - 4, ty = ly + side * away * up[1] + 4;
  // The guides in a viewport of the map's own rectangle: what is offset past its edge is cut.
  const box = `x="${area.x0.toFixed(1)}" y="${area.y0.toFixed(1)}" width="${
    (area.x1 - area.x0).toFixed(1)
  }" height="${(area.y1 - area.y0).toFixed(1)}"`;
  const guide = (p: [number, number][]) =>
    `<path class="guide" d="${
      path(p)
    }" fill="none" stroke="#ffffff" stroke-width="0.8" stroke-opacity="0.75" stroke-dasharray="2 4"/>`;
  return `<g class="overlay" data-name="${escapeXml(name)}"><svg class="guides" ${box} viewBox="${
    area.x0.toFixed(1)
  } ${area.y0.toFixed(1)} ${(area.x1 - area.x0).toFixed(1)} ${
    (area.y1 - area.y0).toFixed(1)
  }" overflow="hidden">${guide(shifted(GUIDE_GAP))}${
    guide(shifted(-GUIDE_GAP))
  }</svg><text class="overlay-label" x="${tx.toFixed(1)}" y="${
    ty.toFixed(1)
  }" text-anchor="end" fill="#ffffff" stroke="#1a1038" stroke-width="2.4" paint-order="stroke" font-weight="600">${
    escapeXml(name)
  }</text></g>`;
}

/** A mode shape drawn on the test geometry. */
export interface Wireframe {
  readonly title: string;
  /** The points: position and displacement (x, y, z). */
  readonly points: readonly {
    name: string;
    at: readonly [number, number, number];
    move: readonly [number, number, number];
  }[];
  /** Lines between points, by index. */
  readonly lines: readonly (readonly [number, number])[];
  readonly width?: number;
  readonly height?: number;
}

/**
 * A projected wire-frame of a mode shape: the undeformed geometry in grey,
 * dashed, and the deformed one in the first palette colour, displacements
 * scaled so that the largest is 25 % of the geometry's extent. Isometric
 * projection (x and y at ±30° from the horizontal, z up).
 *
 * @example
 * ```ts
 * import { wireframe } from "./svg_plot.ts";
 * const svg = wireframe({ title: "mode 1", lines: [[0, 1]], points: [
 *   { name: "1", at: [0, 0, 0], move: [0, 0, 1] }, { name: "2", at: [1, 0, 0], move: [0, 0, -1] }] });
 * if ((svg.match(/<line class="deformed"/g) ?? []).length !== 1) throw new Error();
 * ```
 */
export function wireframe(plot: Wireframe): string {
  const width = plot.width ?? 360;
  const height = plot.height ?? 260;
  const c = Math.cos(Math.PI / 6), s = Math.sin(Math.PI / 6);
  const project = (p: readonly number[]) => [(p[0] - p[1]) * c, p[2] + (p[0] + p[1]) * s];
  let extent = 0, largest = 0;
  for (const a of plot.points) {
    for (const b of plot.points) {
      extent = Math.max(
        extent,
        Math.hypot(a.at[0] - b.at[0], a.at[1] - b.at[1], a.at[2] - b.at[2]),
      );
    }
    largest = Math.max(largest, Math.hypot(...a.move));
  }
  const scale = largest > 0 && extent > 0 ? (0.25 * extent) / largest : 0;
  const base = plot.points.map((p) => project(p.at));
  const moved = plot.points.map((p) => project(p.at.map((v, k) => v + scale * p.move[k])));
  const all = [...base, ...moved];
  const xs = all.map((p) => p[0]), ys = all.map((p) => p[1]);
  const [x0, x1] = [minOf(xs), maxOf(xs)], [y0, y1] = [minOf(ys), maxOf(ys)];
  const span = Math.max(x1 - x0, y1 - y0, 1e-12);
  const k = Math.min(width - 40, height - 70) / span;
  const px = (
    p: number[],
  ) => [
    20 + (p[0] - x0) * k + ((width - 40) - (x1 - x0) * k) / 2,
    height - 20 - (p[1] - y0) * k - ((height - 70) - (y1 - y0) * k) / 2,
  ];
  const line = (a: number[], b: number[], cls: string, style: string) => {
    const [ax, ay] = px(a), [bx, by] = px(b);
    return `<line class="${cls}" x1="${ax.toFixed(1)}" y1="${ay.toFixed(1)}" x2="${
      bx.toFixed(1)
    }" y2="${by.toFixed(1)}" ${style}/>`;
  };
  const parts = [
    ...plot.lines.map(([a, b]) =>
      line(
        base[a],
        base[b],
        "undeformed",
        'stroke="#9aa5b1" stroke-width="1" stroke-dasharray="4 3"',
      )
    ),
    ...plot.lines.map(([a, b]) =>
      line(moved[a], moved[b], "deformed", `stroke="${PALETTE[0]}" stroke-width="2"`)
    ),
    ...moved.map((p, i) => {
      const [x, y] = px(p);
      return `<circle cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="2.5" fill="${
        PALETTE[0]
      }"/><text x="${(x + 4).toFixed(1)}" y="${(y - 4).toFixed(1)}" fill="#3d4b59">${
        escapeXml(plot.points[i].name)
      }</text>`;
    }),
  ];
  return frame(width, height, plot.title, parts.join("\n"));
}
