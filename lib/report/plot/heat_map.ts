/**
 * Colour maps as standalone SVG: the cells as one PNG image, a colour bar,
 * and lines drawn over the map (order lines) with guides that keep the ridge
 * they mark in view.
 *
 * @module
 */
import { Buffer } from "node:buffer";
import { escapeXml } from "../escape_xml.ts";
import { encodePng } from "../png.ts";
import { tickLabel } from "./axes.ts";
import { frame, MARGIN, plotFrame, titleExtra } from "./frame.ts";
import { LEGEND_BESIDE_MIN_WIDTH } from "./legend.ts";
// @ts-types="npm:@types/d3-scale@4.0.9"
import { type ScaleLinear, scaleLinear } from "npm:d3-scale@4.0.3";

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
 * import { mapColour } from "./heat_map.ts";
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
 * import { heatMap } from "./heat_map.ts";
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
