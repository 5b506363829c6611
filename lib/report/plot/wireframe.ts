/**
 * A mode shape as a projected wire-frame on the test geometry, as
 * standalone SVG.
 *
 * @module
 */
import { maxOf, minOf } from "../../extent.ts";
import { escapeXml } from "../escape_xml.ts";
import { frame, PALETTE } from "./frame.ts";

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
 * import { wireframe } from "./wireframe.ts";
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
