/**
 * A mode shape drawn on the test geometry at a size that fits a page (a
 * fixed 720 × 420 picture, aspect kept), with point labels placed clear of
 * the lines, and the data for the report's script to animate it: the
 * deformation through one cycle, Re(φ·e^{iωt}) = Re φ·cos ωt − Im φ·sin ωt.
 * Without JavaScript (and in print) the static drawing of the real part
 * stays.
 *
 * @module
 */
import { formatFixed } from "../format_number.ts";
import { escapeXml } from "./escape_xml.ts";
import { PALETTE } from "./plot/frame.ts";
import { scriptJson } from "./time_history.ts";

/** A point of a shape: position, and the complex shape in x, y, z. */
export interface ShapePoint {
  readonly name: string;
  readonly at: readonly [number, number, number];
  /** Real part of the shape (x, y, z). */
  readonly re: readonly [number, number, number];
  /** Imaginary part of the shape (x, y, z). */
  readonly im: readonly [number, number, number];
}

/** A mode shape on its geometry. */
export interface ShapeDrawing {
  readonly title: string;
  readonly points: readonly ShapePoint[];
  /** Lines between points, by index. */
  readonly lines: readonly (readonly [number, number])[];
}

/** The picture's size: wide, so that at a page's width it stays under 600 px tall. */
export const SHAPE_SIZE = { width: 720, height: 420 } as const;

/** Largest motion drawn, as a share of the geometry's extent. */
const MOTION_SHARE = 0.2;

/** Isometric projection: x and y at ±30° from the horizontal, z up. */
const C30 = Math.cos(Math.PI / 6), S30 = Math.sin(Math.PI / 6);
const project = (p: readonly number[]): [number, number] => [
  (p[0] - p[1]) * C30,
  p[2] + (p[0] + p[1]) * S30,
];

/** Distance from point (px, py) to the segment a–b. */
function toSegment(px: number, py: number, a: number[], b: number[]): number {
  const dx = b[0] - a[0], dy = b[1] - a[1];
  const length2 = dx * dx + dy * dy;
  const u = length2 === 0
    ? 0
    : Math.max(0, Math.min(1, ((px - a[0]) * dx + (py - a[1]) * dy) / length2));
  return Math.hypot(px - (a[0] + u * dx), py - (a[1] + u * dy));
}

/** What the animation needs per point, in picture pixels: base, and the real and imaginary motion. */
export interface ShapeMotion {
  readonly base: readonly (readonly [number, number])[];
  readonly re: readonly (readonly [number, number])[];
  readonly im: readonly (readonly [number, number])[];
  readonly lines: readonly (readonly [number, number])[];
}

/**
 * A mode shape as a static SVG (undeformed geometry grey and dashed, the
 * real part of the shape deformed in the first palette colour) and the
 * motion for the animation, both in the picture's pixels. The motion is
 * scaled so that the largest |φ| at a point moves it by 20 % of the
 * geometry's extent; the whole cycle stays inside the picture.
 *
 * @example
 * ```ts
 * import { shapeDrawing } from "./shape_view.ts";
 * const v = shapeDrawing({ title: "mode 1", lines: [[0, 1]], points: [
 *   { name: "1", at: [0, 0, 0], re: [0, 0, 1], im: [0, 0, 0] }, { name: "2", at: [1, 0, 0], re: [0, 0, -1], im: [0, 0, 0] }] });
 * if ((v.svg.match(/<line class="deformed"/g) ?? []).length !== 1) throw new Error();
 * // Point 1 moves up (smaller y on the page) by the real part; point 2 down.
 * if (!(v.motion.re[0][1] < 0 && v.motion.re[1][1] > 0)) throw new Error();
 * ```
 */
export function shapeDrawing(plot: ShapeDrawing): { svg: string; motion: ShapeMotion } {
  const { width, height } = SHAPE_SIZE;
  let extent = 0, largest = 0;
  for (const a of plot.points) {
    for (const b of plot.points) {
      extent = Math.max(
        extent,
        Math.hypot(a.at[0] - b.at[0], a.at[1] - b.at[1], a.at[2] - b.at[2]),
      );
    }
    largest = Math.max(
      largest,
      Math.hypot(a.re[0], a.re[1], a.re[2], a.im[0], a.im[1], a.im[2]),
    );
  }
  const scale = largest > 0 && extent > 0 ? (MOTION_SHARE * extent) / largest : 0;
  const base = plot.points.map((p) => project(p.at));
  // Projection is linear: the motion of each part projects on its own.
  const re = plot.points.map((p) => project(p.re.map((v) => scale * v)));
  const im = plot.points.map((p) => project(p.im.map((v) => scale * v)));
  // Bounds over the whole cycle: each point moves on an ellipse within base ± √(re² + im²).
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  base.forEach((b, i) => {
    const rx = Math.hypot(re[i][0], im[i][0]), ry = Math.hypot(re[i][1], im[i][1]);
    x0 = Math.min(x0, b[0] - rx);
    x1 = Math.max(x1, b[0] + rx);
    y0 = Math.min(y0, b[1] - ry);
    y1 = Math.max(y1, b[1] + ry);
  });
  // Room for the title above and labels around: the drawing fills the rest, aspect kept.
  const top = 44, pad = 36;
  const k = Math.min(
    (width - 2 * pad) / Math.max(x1 - x0, 1e-12),
    (height - top - pad) / Math.max(y1 - y0, 1e-12),
  );
  const offsetX = pad + ((width - 2 * pad) - (x1 - x0) * k) / 2;
  const offsetY = top + ((height - top - pad) - (y1 - y0) * k) / 2;
  const px = (p: readonly number[]): [number, number] => [
    offsetX + (p[0] - x0) * k,
    offsetY + (y1 - p[1]) * k,
  ];
  // Motion in pixels: y grows down the page.
  const vector = (v: readonly number[]): [number, number] => [v[0] * k, -v[1] * k];
  const motion: ShapeMotion = {
    base: base.map(px),
    re: re.map(vector),
    im: im.map(vector),
    lines: plot.lines,
  };
  const at = (i: number): [number, number] => [
    motion.base[i][0] + motion.re[i][0],
    motion.base[i][1] + motion.re[i][1],
  ];
  const segment = (a: readonly number[], b: readonly number[], cls: string, style: string) =>
    `<line class="${cls}" x1="${a[0].toFixed(1)}" y1="${a[1].toFixed(1)}" x2="${
      b[0].toFixed(1)
    }" y2="${b[1].toFixed(1)}" ${style}/>`;
  const segments: number[][][] = [
    ...plot.lines.map(([a, b]) => [[...motion.base[a]], [...motion.base[b]]]),
    ...plot.lines.map(([a, b]) => [at(a), at(b)]),
  ];
  const parts = [
    ...plot.lines.map(([a, b]) =>
      segment(
        motion.base[a],
        motion.base[b],
        "undeformed",
        'stroke="#9aa5b1" stroke-width="1" stroke-dasharray="4 3"',
      )
    ),
    ...plot.lines.map(([a, b], j) =>
      segment(
        at(a),
        at(b),
        "deformed",
        `data-line="${j}" stroke="${PALETTE[0]}" stroke-width="2.2"`,
      )
    ),
    ...plot.points.map((_, i) => {
      const [x, y] = at(i);
      return `<circle class="moving" data-point="${i}" cx="${x.toFixed(1)}" cy="${
        y.toFixed(1)
      }" r="3" fill="${PALETTE[0]}"/>`;
    }),
    ...placeLabels(plot.points.map((p) => p.name), motion.base, segments),
  ];
  const svg =
    `<svg xmlns="http://www.w3.org/2000/svg" class="shape" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" style="max-width:1000px" role="img" aria-label="${
      escapeXml(plot.title)
    }" font-family="Helvetica, Arial, sans-serif" font-size="13">
<rect width="${width}" height="${height}" fill="#ffffff"/>
<text x="${pad}" y="22" font-size="15" font-weight="600" fill="#22313f">${
      escapeXml(plot.title)
    }</text>
<text x="${pad}" y="37" fill="#6b7785">grey dashed: geometry at rest; blue: real part of the shape</text>
${parts.join("\n")}
</svg>`;
  return { svg, motion };
}

/**
 * Point labels, each at the one of eight places around its point (at the
 * geometry at rest) farthest from every line and every label already
 * placed, so that no label sits on a line.
 */
function placeLabels(
  names: readonly string[],
  at: readonly (readonly [number, number])[],
  segments: readonly number[][][],
): string[] {
  const placed: { x: number; y: number; half: number }[] = [];
  return names.map((name, i) => {
    // The label's box at 13 px (11 px or more where the 720 px picture is shown 648 px wide):
    // about 8 px a character (with a margin), 16 px tall.
    const half = 4 * Math.max(1, name.length) + 2, halfHeight = 8;
    let best = { x: at[i][0] + 12 + half, y: at[i][1] - 12 }, score = -Infinity;
    for (const radius of [12, 20, 30]) {
      for (let d = 0; d < 16; d++) {
        const angle = (d * Math.PI) / 8;
        const x = at[i][0] + (radius + half * Math.abs(Math.cos(angle))) * Math.cos(angle);
        const y = at[i][1] - (radius + halfHeight * Math.abs(Math.sin(angle))) * Math.sin(angle);
        const box = { x0: x - half, x1: x + half, y0: y - halfHeight, y1: y + halfHeight };
        // Clearance: to every line and every label already placed; nearer places win ties.
        let clear = Infinity;
        for (const [a, b] of segments) clear = Math.min(clear, boxToSegment(box, a, b));
        for (const p of placed) {
          clear = Math.min(
            clear,
            Math.max(Math.abs(p.x - x) - p.half - half, Math.abs(p.y - y) - 2 * halfHeight),
          );
        }
        const value = Math.min(clear, 12) - 0.01 * radius;
        if (value > score) {
          score = value;
          best = { x, y };
        }
      }
    }
    placed.push({ ...best, half });
    return `<text class="point-label" x="${best.x.toFixed(1)}" y="${
      (best.y + 4).toFixed(1)
    }" text-anchor="middle" fill="#3d4b59">${escapeXml(name)}</text>`;
  });
}

/** Distance from a box to the segment a–b: 0 when the segment enters the box. */
function boxToSegment(
  box: { x0: number; x1: number; y0: number; y1: number },
  a: number[],
  b: number[],
): number {
  const inside = (p: number[]) =>
    p[0] >= box.x0 && p[0] <= box.x1 && p[1] >= box.y0 && p[1] <= box.y1;
  if (inside(a) || inside(b)) return 0;
  const corners = [[box.x0, box.y0], [box.x1, box.y0], [box.x1, box.y1], [box.x0, box.y1]];
  // A segment that crosses an edge of the box.
  const cross = (p: number[], q: number[], r: number[], s: number[]) => {
    const d = (q[0] - p[0]) * (s[1] - r[1]) - (q[1] - p[1]) * (s[0] - r[0]);
    if (d === 0) return false;
    const t = ((r[0] - p[0]) * (s[1] - r[1]) - (r[1] - p[1]) * (s[0] - r[0])) / d;
    const u = ((r[0] - p[0]) * (q[1] - p[1]) - (r[1] - p[1]) * (q[0] - p[0])) / d;
    return t >= 0 && t <= 1 && u >= 0 && u <= 1;
  };
  for (let k = 0; k < 4; k++) if (cross(a, b, corners[k], corners[(k + 1) % 4])) return 0;
  let distance = Infinity;
  for (const [x, y] of corners) distance = Math.min(distance, toSegment(x, y, a, b));
  for (const p of [a, b]) {
    const dx = Math.max(box.x0 - p[0], 0, p[0] - box.x1);
    const dy = Math.max(box.y0 - p[1], 0, p[1] - box.y1);
    distance = Math.min(distance, Math.hypot(dx, dy));
  }
  return distance;
}

/**
 * A figure's markup: the static drawing and the motion for the report's
 * script, which adds a play/pause button.
 *
 * @example
 * ```ts
 * import { shapeDrawing, shapeFigureHtml } from "./shape_view.ts";
 * const v = shapeDrawing({ title: "m", lines: [[0, 1]], points: [
 *   { name: "1", at: [0, 0, 0], re: [0, 0, 1], im: [0, 0, 0] }, { name: "2", at: [1, 0, 0], re: [0, 0, 0], im: [0, 0, 1] }] });
 * if (!shapeFigureHtml(v).includes('class="shape-data"')) throw new Error();
 * ```
 */
export function shapeFigureHtml(view: { svg: string; motion: ShapeMotion }): string {
  const round = (v: readonly number[]) => v.map((x) => Number(x.toFixed(2)));
  return `<div class="shape-view">${view.svg}</div>${
    scriptJson({
      base: view.motion.base.map(round),
      re: view.motion.re.map(round),
      im: view.motion.im.map(round),
      lines: view.motion.lines,
    }, "shape-data")
  }`;
}

/** A modal fit's shape rows (tidy: one per mode and degree of freedom). */
export interface ShapeRows {
  readonly mode: ArrayLike<number>;
  readonly point: ArrayLike<unknown>;
  readonly direction: ArrayLike<unknown>;
  readonly re: ArrayLike<number>;
  readonly im: ArrayLike<number>;
}

/**
 * The report's figure of one fitted mode on the test geometry: the shape
 * rows of that mode gathered per point (direction "+z", "-x", …; none means
 * z), drawn and made ready to animate. Marked small: shapes sit two abreast.
 *
 * @example
 * ```ts
 * import { shapeFigure } from "./shape_view.ts";
 * const geometry = { points: [{ point: "1", x: 0, y: 0, z: 0 }, { point: "2", x: 1, y: 0, z: 0 }], lines: [["1", "2"]] as [string, string][] };
 * const { figure } = shapeFigure("m", { mode: 1, frequencyHz: 40, dampingRatio: 0.01 }, geometry,
 *   new Map([["1", 0], ["2", 1]]), { mode: [1, 1], point: ["1", "2"], direction: ["+z", "-z"], re: [1, 1], im: [0, 0] });
 * if (figure.name !== "m_shape_1" || !figure.html.includes("shape-data")) throw new Error();
 * ```
 */
export function shapeFigure(
  id: string,
  fitted: { mode: number; frequencyHz: number; dampingRatio: number },
  geometry: {
    points: readonly { point: string; x: number; y: number; z: number }[];
    lines: readonly (readonly [string, string])[];
  },
  index: ReadonlyMap<string, number>,
  rows: ShapeRows,
): { figure: { name: string; svg: string; html: string; small: true } } {
  const zero = () => [0, 0, 0] as [number, number, number];
  const re = geometry.points.map(zero), im = geometry.points.map(zero);
  for (let k = 0; k < rows.mode.length; k++) {
    if (rows.mode[k] !== fitted.mode) continue;
    const i = index.get(String(rows.point[k]));
    if (i === undefined) continue;
    const d = /^([+-]?)([xyz])$/i.exec(String(rows.direction[k]));
    const axis = d === null ? 2 : "xyz".indexOf(d[2].toLowerCase());
    const sign = d !== null && d[1] === "-" ? -1 : 1;
    re[i][axis] += sign * rows.re[k];
    im[i][axis] += sign * rows.im[k];
  }
  const view = shapeDrawing({
    title: `Mode ${fitted.mode}: ${formatFixed(fitted.frequencyHz, 1)} Hz, ζ ${
      formatFixed(100 * fitted.dampingRatio, 2)
    } %`,
    points: geometry.points.map((p, i) => ({
      name: p.point,
      at: [p.x, p.y, p.z],
      re: re[i],
      im: im[i],
    })),
    lines: geometry.lines.flatMap(([a, b]) => {
      const ia = index.get(a), ib = index.get(b);
      return ia === undefined || ib === undefined ? [] : [[ia, ib] as [number, number]];
    }),
  });
  return {
    figure: {
      name: `${id}_shape_${fitted.mode}`,
      svg: view.svg,
      html: shapeFigureHtml(view),
      small: true,
    },
  };
}
