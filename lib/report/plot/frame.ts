/**
 * quiver's look for every plot: the line palette, the margins, the white
 * picture with its (wrapped) title, and a plot area's outline with its axis
 * labels.
 *
 * @module
 */
import { escapeXml } from "../escape_xml.ts";

/** quiver's line palette. */
export const PALETTE = ["#1d4e89", "#d1495b", "#2e8b57", "#edae49", "#6a4c93"] as const;

/** The space around a plot area for its title, tick labels and axis labels, px. */
export const MARGIN = { top: 34, right: 18, bottom: 46, left: 70 };

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
export function titleExtra(title: string, width: number): number {
  return 16 * (titleLines(title, width).length - 1);
}
/** A picture of `width` × `height` px: white, with the title at the top, around `body`. */
export function frame(width: number, height: number, title: string, body: string): string {
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

/** The plot area's outline and the two axis labels, for a plot area ending at `right` px from the edge. */
export function plotFrame(
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
