/**
 * A line plot's data and look for the report's interactive chart: the same
 * series, colours, labels and ranges as the static picture, JSON-ready.
 *
 * @module
 */
import { type Axis, labelledAxis, shownDomain } from "./axes.ts";
import { PALETTE } from "./frame.ts";
import type { LinePlot } from "./line_plot.ts";

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
 * import { chartSpec } from "./chart_spec.ts";
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
