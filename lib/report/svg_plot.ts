/**
 * Plots as standalone SVG strings: lines on linear or logarithmic axes, bar
 * spectra, and colour maps. Axes come from d3-scale; every axis carries its
 * label with unit. The look is quiver's own: a white field, fine grey
 * grid, a slate frame, and a five-colour line palette chosen to stay
 * distinguishable in greyscale print.
 *
 * @module
 */
import { maxOf, minOf } from "../extent.ts";
// @ts-types="npm:@types/d3-scale@4.0.9"
import { scaleLinear, scaleLog } from "npm:d3-scale@4.0.3";

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
}

/** An axis. */
export interface Axis {
  /** Label with unit, e.g. "Frequency [Hz]". */
  readonly label: string;
  /** Logarithmic? Default false. */
  readonly log?: boolean;
  /** Fixed domain; default: the data's extent. */
  readonly domain?: readonly [number, number];
}

/** A line plot. */
export interface LinePlot {
  readonly title: string;
  readonly x: Axis;
  readonly y: Axis;
  readonly series: readonly Series[];
  /** Pixel size. Default 720 × 360. */
  readonly width?: number;
  readonly height?: number;
}

const MARGIN = { top: 34, right: 18, bottom: 46, left: 70 };

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

function makeScale(axis: Axis, values: number[], range: [number, number]) {
  const domain = axis.domain ?? extent(values, axis.log === true);
  return axis.log === true
    ? scaleLog().domain(domain).range(range).clamp(true)
    : scaleLinear().domain(domain).range(range).nice();
}

function tickLabel(v: number): string {
  const a = Math.abs(v);
  if (a === 0) return "0";
  if (a >= 1e5 || a < 1e-3) return v.toExponential(0);
  return Number(v.toPrecision(3)).toString();
}

function frame(width: number, height: number, title: string, body: string): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-label="${
    escapeXml(title)
  }" font-family="Helvetica, Arial, sans-serif" font-size="11">
<rect width="${width}" height="${height}" fill="#ffffff"/>
<text x="${MARGIN.left}" y="20" font-size="13" font-weight="600" fill="#22313f">${
    escapeXml(title)
  }</text>
${body}
</svg>`;
}

function axes(
  x: ReturnType<typeof makeScale>,
  y: ReturnType<typeof makeScale>,
  xAxis: Axis,
  yAxis: Axis,
  height: number,
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
  for (const t of xTicks) {
    const px = x(t);
    parts.push(`<line x1="${px}" x2="${px}" y1="${y1}" y2="${y0}" stroke="#e3e7ec"/>`);
    parts.push(
      `<text x="${px}" y="${y0 + 14}" text-anchor="middle" fill="#3d4b59">${tickLabel(t)}</text>`,
    );
  }
  for (const t of yTicks) {
    const py = y(t);
    parts.push(`<line x1="${x0}" x2="${x1}" y1="${py}" y2="${py}" stroke="#e3e7ec"/>`);
    parts.push(
      `<text x="${x0 - 6}" y="${py + 4}" text-anchor="end" fill="#3d4b59">${tickLabel(t)}</text>`,
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

function legend(
  names: readonly { name: string; dashed?: boolean }[],
  x: number,
  y: number,
): string {
  return names.map((s, i) =>
    `<g transform="translate(${x - 150} ${
      y + 6 + 14 * i
    })"><line x1="0" x2="18" y1="0" y2="0" stroke="${
      PALETTE[i % PALETTE.length]
    }" stroke-width="2"${
      s.dashed === true ? ' stroke-dasharray="5 3"' : ""
    }/><text x="24" y="4" fill="#22313f">${escapeXml(s.name)}</text></g>`
  ).join("\n");
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
  const width = plot.width ?? 720;
  const height = plot.height ?? 360;
  const xs = plot.series.flatMap((s) => Array.from(s.x));
  const ys = plot.series.flatMap((s) => Array.from(s.y));
  const x = makeScale(plot.x, xs, [MARGIN.left, width - MARGIN.right]);
  const y = makeScale(plot.y, ys, [height - MARGIN.bottom, MARGIN.top]);
  const [xlo, xhi] = x.domain() as [number, number];
  const paths = plot.series.map((s, i) => {
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
    `${axes(x, y, plot.x, plot.y, height)}\n${paths.join("\n")}\n${
      legend(plot.series, width - MARGIN.right, MARGIN.top)
    }`,
  );
}

/** The plot area's outline and the two axis labels, for a plot area ending at `right` px from the edge. */
function plotFrame(
  width: number,
  height: number,
  right: number,
  xLabel: string,
  yLabel: string,
): string {
  return [
    `<rect x="${MARGIN.left}" y="${MARGIN.top}" width="${width - right - MARGIN.left}" height="${
      height - MARGIN.top - MARGIN.bottom
    }" fill="none" stroke="#5b6b7b"/>`,
    `<text x="${(MARGIN.left + width - right) / 2}" y="${
      height - 8
    }" text-anchor="middle" fill="#22313f">${escapeXml(xLabel)}</text>`,
    `<text transform="translate(16 ${
      (height - MARGIN.bottom + MARGIN.top) / 2
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
  const width = plot.width ?? 720;
  const height = plot.height ?? 360;
  const values = plot.groups.flatMap((g) => Array.from(g.values)).filter(Number.isFinite);
  const lo = minOf(values);
  const hi = maxOf(values);
  const y = scaleLinear().domain([Math.floor((lo - 10) / 10) * 10, Math.ceil((hi + 5) / 10) * 10])
    .range([
      height - MARGIN.bottom,
      MARGIN.top,
    ]);
  const x = scaleLinear().domain([0, plot.labels.length]).range([
    MARGIN.left,
    width - MARGIN.right,
  ]);
  const slot = x(1) - x(0);
  const barWidth = (0.8 * slot) / plot.groups.length;
  const parts: string[] = [];
  for (const t of y.ticks(6)) {
    parts.push(
      `<line x1="${MARGIN.left}" x2="${width - MARGIN.right}" y1="${y(t)}" y2="${
        y(t)
      }" stroke="#e3e7ec"/>`,
    );
    parts.push(
      `<text x="${MARGIN.left - 6}" y="${y(t) + 4}" text-anchor="end" fill="#3d4b59">${
        tickLabel(t)
      }</text>`,
    );
  }
  const every = Math.max(1, Math.ceil(plot.labels.length / 16));
  plot.labels.forEach((label, i) => {
    if (i % every === 0) {
      parts.push(
        `<text x="${x(i + 0.5)}" y="${
          height - MARGIN.bottom + 14
        }" text-anchor="middle" fill="#3d4b59">${escapeXml(label)}</text>`,
      );
    }
    plot.groups.forEach((g, j) => {
      const v = g.values[i];
      if (!Number.isFinite(v)) return;
      const top = y(v);
      parts.push(
        `<rect class="bar" x="${(x(i) + 0.1 * slot + j * barWidth).toFixed(1)}" y="${
          top.toFixed(1)
        }" width="${barWidth.toFixed(1)}" height="${
          (height - MARGIN.bottom - top).toFixed(1)
        }" fill="${PALETTE[j % PALETTE.length]}"/>`,
      );
    });
  });
  parts.push(plotFrame(width, height, MARGIN.right, plot.xLabel, plot.yLabel));
  return frame(
    width,
    height,
    plot.title,
    parts.join("\n") + legend(plot.groups, width - MARGIN.right, MARGIN.top),
  );
}

/** quiver's colour ramp for maps: deep blue → teal → sand → brick (own choice). */
const RAMP = ["#16324f", "#1f6f78", "#7fb685", "#f2d492", "#c8553d"];

function rampColour(u: number): string {
  const t = Math.min(1, Math.max(0, u)) * (RAMP.length - 1);
  const i = Math.min(RAMP.length - 2, Math.floor(t));
  const f = t - i;
  const parse = (h: string) => [1, 3, 5].map((k) => parseInt(h.slice(k, k + 2), 16));
  const a = parse(RAMP[i]), b = parse(RAMP[i + 1]);
  return `rgb(${a.map((v, k) => Math.round(v + f * (b[k] - v))).join(",")})`;
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
 * if ((svg.match(/<rect class="cell"/g) ?? []).length !== 6) throw new Error();
 * ```
 */
export function heatMap(plot: HeatMap): string {
  const width = plot.width ?? 720;
  const height = plot.height ?? 380;
  const right = MARGIN.right + 60;
  const all = plot.z.flatMap((col) => Array.from(col)).filter(Number.isFinite);
  const max = maxOf(all);
  const domain = plot.zDomain ?? [Math.max(minOf(all), max - 50), max];
  const x = scaleLinear().domain([0, plot.x.length]).range([MARGIN.left, width - right]);
  const y = scaleLinear().domain([0, plot.y.length]).range([height - MARGIN.bottom, MARGIN.top]);
  const parts: string[] = [];
  const cw = x(1) - x(0);
  const ch = y(0) - y(1);
  plot.z.forEach((col, i) => {
    for (let j = 0; j < plot.y.length; j++) {
      const u = (col[j] - domain[0]) / (domain[1] - domain[0]);
      parts.push(
        `<rect class="cell" x="${x(i).toFixed(1)}" y="${y(j + 1).toFixed(1)}" width="${
          (cw + 0.5).toFixed(1)
        }" height="${(ch + 0.5).toFixed(1)}" fill="${
          Number.isFinite(col[j]) ? rampColour(u) : "#ffffff"
        }"/>`,
      );
    }
  });
  const xs = scaleLinear().domain([plot.x[0], plot.x[plot.x.length - 1]]).range([
    x(0.5),
    x(plot.x.length - 0.5),
  ]);
  for (const t of xs.ticks(8)) {
    parts.push(
      `<text x="${xs(t)}" y="${height - MARGIN.bottom + 14}" text-anchor="middle" fill="#3d4b59">${
        tickLabel(t)
      }</text>`,
    );
  }
  const ys = scaleLinear().domain([plot.y[0], plot.y[plot.y.length - 1]]).range([
    y(0.5),
    y(plot.y.length - 0.5),
  ]);
  for (const t of ys.ticks(6)) {
    parts.push(
      `<text x="${MARGIN.left - 6}" y="${ys(t) + 4}" text-anchor="end" fill="#3d4b59">${
        tickLabel(t)
      }</text>`,
    );
  }
  const barX = width - right + 18;
  const zs = scaleLinear().domain(domain as [number, number]).range([
    height - MARGIN.bottom,
    MARGIN.top,
  ]);
  for (let k = 0; k < 40; k++) {
    const y0 = MARGIN.top + ((height - MARGIN.bottom - MARGIN.top) * k) / 40;
    parts.push(
      `<rect x="${barX}" y="${y0.toFixed(1)}" width="14" height="${
        ((height - MARGIN.bottom - MARGIN.top) / 40 + 0.5).toFixed(1)
      }" fill="${rampColour(1 - k / 40)}"/>`,
    );
  }
  for (const t of zs.ticks(5)) {
    parts.push(`<text x="${barX + 18}" y="${zs(t) + 4}" fill="#3d4b59">${tickLabel(t)}</text>`);
  }
  parts.push(
    `<text x="${barX}" y="${MARGIN.top - 6}" fill="#22313f">${escapeXml(plot.zLabel)}</text>`,
  );
  parts.push(plotFrame(width, height, right, plot.xLabel, plot.yLabel));
  return frame(width, height, plot.title, parts.join("\n"));
}
