/**
 * Grouped bars as standalone SVG (band spectra, differences per band), with
 * limit curves drawn over them and the bars that break a limit marked.
 *
 * @module
 */
import { maxOf, minOf } from "../../extent.ts";
import { escapeXml } from "../escape_xml.ts";
import { formatTick, tickLabel } from "./axes.ts";
import { frame, MARGIN, PALETTE, plotFrame, titleExtra } from "./frame.ts";
import { hatching, type LegendEntry, legendPlace, overMark, placedLegend } from "./legend.ts";
// @ts-types="npm:@types/d3-scale@4.0.9"
import { scaleLinear } from "npm:d3-scale@4.0.3";

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
 * import { barPlot } from "./bar_plot.ts";
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
