/**
 * Plot legends (beside a wide plot's frame, in rows under a narrow one's)
 * and the over-limit marking they explain: hatching and a warning mark.
 *
 * @module
 */
import { escapeXml } from "../escape_xml.ts";
import { MARGIN, PALETTE } from "./frame.ts";

/** Width of the legend column right of a line plot's frame: legends never cover data. */
const LEGEND_WIDTH = 170;

/** One legend entry: a line (solid or dashed), or the mark of bars over a limit. */
export interface LegendEntry {
  readonly name: string;
  readonly dashed?: boolean;
  readonly colour?: string;
  /** The entry explains the over-limit marking (hatched bar and warning mark). */
  readonly over?: boolean;
}

/** Plots narrower than this put their legend under the frame, where it does not squeeze the data. */
export const LEGEND_BESIDE_MIN_WIDTH = 720;

/** Height of one legend row. */
const LEGEND_ROW = 16;

/**
 * Where a plot of `width` px puts its legend: beside the frame in a column
 * of {@linkcode LEGEND_WIDTH} (wide plots), or under it in rows of columns
 * (narrow plots), with the extra height that takes.
 */
export function legendPlace(width: number, entries: number): {
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
export function hatching(x: number, y: number, w: number, h: number): string {
  const d = hatchPath(x, y, w, h);
  if (d === "") return "";
  return `<path class="hatch" d="${d}" stroke="#ffffff" stroke-width="2.4" fill="none"/><path class="hatch" d="${d}" stroke="#22313f" stroke-width="1" fill="none"/>`;
}

/** The over-limit mark: a red triangle with a white bar and dot, its tip at (x, y − size). */
export function overMark(x: number, y: number, size = 13): string {
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
export function placedLegend(
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
