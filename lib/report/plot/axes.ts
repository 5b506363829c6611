/**
 * Axes and scales shared by the plots: the shown domain of an axis (with
 * headroom and a limited dynamic range on a logarithmic value axis), the
 * d3-scale scales, tick positions and labels, and the drawn axes with their
 * grid.
 *
 * @module
 */
import { maxOf, minOf } from "../../extent.ts";
import { escapeXml } from "../escape_xml.ts";
// @ts-types="npm:@types/d3-scale@4.0.9"
import { type ScaleLinear, scaleLinear, scaleLog } from "npm:d3-scale@4.0.3";

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
export function shownDomain(axis: Axis, values: number[], headroom: boolean): {
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

/** The d3 scale of an axis over `range` px: logarithmic (clamped) or linear (nice). */
export function makeScale(axis: Axis, values: number[], range: [number, number], headroom = false) {
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
export function formatTick(v: number): string {
  return Number(v.toPrecision(4)).toString();
}

/** A tick label: 3 significant digits, exponential beyond 1e5 and below 1e-3. */
export function tickLabel(v: number): string {
  const a = Math.abs(v);
  if (a === 0) return "0";
  if (a >= 1e5 || a < 1e-3) return v.toExponential(0);
  return Number(v.toPrecision(3)).toString();
}

/** The grid, tick labels, frame and axis labels of a plot on scales `x` and `y`. */
export function axes(
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

/** The axis with its label saying when a logarithmic range was limited. */
export function labelledAxis(axis: Axis, values: number[]): Axis {
  return shownDomain(axis, values, true).clamped
    ? { ...axis, label: `${axis.label}, top ${DYNAMIC_RANGE_DB} dB shown` }
    : axis;
}
