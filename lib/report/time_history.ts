/**
 * The report's view of the raw time history of each recording a plan reads:
 * a min/max envelope per pixel column, computed in one streaming pass
 * through the one reading path (openRecordingStream), so memory is flat in
 * record length and the data embedded in the report is bounded (at most
 * {@linkcode ENVELOPE_COLUMNS} columns per channel). Columns where the
 * signal checks found the waveform cut at its rails are marked, and so are
 * the plan's time slices (a recording's start/end, and any analysis's own).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import type { RecordingStream } from "../io/recording_stream.ts";
import { ChannelStatistics } from "../io/signal_checks.ts";
import type { Plan } from "../plan/schema.ts";
// @ts-types="npm:@types/d3-scale@4.0.9"
import { scaleLinear } from "npm:d3-scale@4.0.3";
import { escapeXml } from "./escape_xml.ts";
import { PALETTE } from "./plot/frame.ts";

/** Columns of an envelope unless asked for fewer: about one per pixel of a wide plot. */
export const ENVELOPE_COLUMNS = 2000;

/** One channel's envelope. */
export interface ChannelEnvelope {
  readonly name: string;
  readonly unit: string;
  /** Smallest sample in each column. */
  readonly min: Float64Array;
  /** Largest sample in each column. */
  readonly max: Float64Array;
  /**
   * Columns holding a sample at a rail the signal checks called clipped
   * (empty when they did not warn of clipping).
   */
  readonly clipped: readonly number[];
  /** The signal checks' warnings for the channel. */
  readonly warnings: readonly string[];
}

/** A recording's min/max envelope per column. */
export interface TimeEnvelope {
  /** Time of the first sample, s. */
  readonly startTime: number;
  /** Sample rate, Hz. */
  readonly rate: number;
  /** Samples per channel. */
  readonly length: number;
  /** First sample of each column, and the record's length last (columns + 1 entries). */
  readonly edges: Float64Array;
  readonly channels: readonly ChannelEnvelope[];
}

/**
 * The first sample of column c of `columns` over `length` samples:
 * ceil(c·length/columns), so that sample i lies in column
 * floor(i·columns/length).
 */
function columnStart(c: number, columns: number, length: number): number {
  return Math.ceil((c * length) / columns);
}

/**
 * The min/max envelope of every channel of `stream` in at most `columns`
 * columns (fewer when the record is shorter), read once, chunk by chunk:
 * sample i falls in column floor(i·columns/length).
 *
 * @throws {RangeError} for a column count that is not a whole number ≥ 1.
 * @throws {QuiverError} as the stream's read does.
 *
 * @example
 * ```ts
 * import { timeEnvelope } from "./time_history.ts";
 * import { recordingSource } from "../io/recording_stream.ts";
 * const data = Float64Array.from([0, 5, -1, 2, 3, -4, 1, 0]);
 * const e = await timeEnvelope(recordingSource({ rate: 8, startTime: 0, channels: [{ name: "a", unit: "V", data }] }), 4);
 * const [a] = e.channels;
 * if (a.max.join() !== "5,2,3,1" || a.min.join() !== "0,-1,-4,0") throw new Error();
 * ```
 */
export async function timeEnvelope(
  stream: RecordingStream,
  columns: number = ENVELOPE_COLUMNS,
): Promise<TimeEnvelope> {
  if (!Number.isInteger(columns) || columns < 1) {
    throw new RangeError(`an envelope needs a whole number of columns ≥ 1, got ${columns}`);
  }
  const length = stream.length;
  if (length < 1) throw new QuiverError("the recording holds no sample");
  const count = Math.min(columns, length);
  const indices = stream.channels.map((_, i) => i);
  const mins = indices.map(() => new Float64Array(count).fill(Infinity));
  const maxs = indices.map(() => new Float64Array(count).fill(-Infinity));
  const statistics = indices.map(() => new ChannelStatistics());
  const edges = Float64Array.from({ length: count + 1 }, (_, c) => columnStart(c, count, length));
  let at = 0; // index in the record of the chunk's first sample
  await stream.read(indices, (chunk) => {
    const n = chunk[0]?.length ?? 0;
    chunk.forEach((x, ch) => {
      statistics[ch].push(x);
      const lo = mins[ch], hi = maxs[ch];
      // Walk the columns the chunk spans, each over its samples in the chunk.
      let c = Math.floor((at * count) / length);
      let i = 0;
      while (i < n) {
        const end = Math.min(n, edges[c + 1] - at);
        let a = lo[c], b = hi[c];
        for (; i < end; i++) {
          const v = x[i];
          if (v < a) a = v;
          if (v > b) b = v;
        }
        lo[c] = a;
        hi[c] = b;
        c++;
      }
    });
    at += n;
  });
  const channels = stream.channels.map((channel, ch): ChannelEnvelope => {
    const warnings = statistics[ch].warnings(channel);
    const extent = statistics[ch].extent;
    const clipped: number[] = [];
    // The checks name clipping at the channel's extremes: the columns that reach them.
    if (extent !== undefined && warnings.some((w) => w.includes("looks clipped"))) {
      for (let c = 0; c < count; c++) {
        if (mins[ch][c] === extent[0] || maxs[ch][c] === extent[1]) clipped.push(c);
      }
    }
    return {
      name: channel.name,
      unit: channel.unit,
      min: mins[ch],
      max: maxs[ch],
      clipped,
      warnings,
    };
  });
  return { startTime: stream.startTime, rate: stream.rate, length, edges, channels };
}

/** A time slice the plan sets on a recording, s on its time axis. */
export interface SliceMark {
  /** Who set it: "recording" or an analysis's id. */
  readonly by: string;
  readonly start?: number;
  readonly end?: number;
}

/**
 * The time slices a plan sets on a recording: the recording's own start/end
 * and those of analyses of it that set their own.
 *
 * @example
 * ```ts
 * import { planSlices } from "./time_history.ts";
 * import { planSchema } from "../plan/schema.ts";
 * const plan = planSchema.parse({ quiver_plan: 1, title: "t", recordings: { r: { file: "r.csv", start: 1, end: 3 } },
 *   analyses: [{ id: "s", command: "spectrum", recording: "r", options: { start: 2 } }] });
 * const marks = planSlices(plan, "r");
 * if (marks.length !== 2 || marks[0].end !== 3 || marks[1].by !== "s" || marks[1].start !== 2) throw new Error();
 * ```
 */
export function planSlices(plan: Plan, recording: string): SliceMark[] {
  const marks: SliceMark[] = [];
  const rec = plan.recordings[recording];
  if (rec !== undefined && (rec.start !== undefined || rec.end !== undefined)) {
    marks.push({ by: "recording", start: rec.start, end: rec.end });
  }
  for (const a of plan.analyses) {
    if (a.recording !== recording) continue;
    const options = (a.options ?? {}) as Record<string, unknown>;
    const start = typeof options.start === "number" ? options.start : undefined;
    const end = typeof options.end === "number" ? options.end : undefined;
    if (start !== undefined || end !== undefined) marks.push({ by: a.id, start, end });
  }
  return marks;
}

/** Pixel size of a time-history picture: width, and height per channel. */
// 640 px wide, shown at most 960 px wide (style.ts VIEWS_STYLE): its 11 px text stays 11 px or more from
// a 700 px window (a 666 px figure) up.
const WIDTH = 640, PANEL = 72, TOP = 34, GAP = 10, BOTTOM = 40, LEFT = 78, RIGHT = 18;

/** What the report's script needs to draw the interactive view (JSON-ready). */
export interface HistorySpec {
  readonly title: string;
  /** Time of each column's centre, s. */
  readonly t: readonly number[];
  readonly channels: readonly {
    name: string;
    unit: string;
    min: readonly (number | null)[];
    max: readonly (number | null)[];
    clipped: readonly number[];
  }[];
  /** Slice marks: time, label, and whether it starts or ends a slice. */
  readonly marks: readonly { t: number; label: string; edge: "start" | "end" }[];
}

/** Numbers rounded to 6 significant digits for the JSON a report carries. */
const compact = (v: number): number | null => Number.isFinite(v) ? Number(v.toPrecision(6)) : null;

/**
 * The static picture (SVG) and the interactive view's data of an envelope:
 * one panel per channel, the band between each column's min and max filled,
 * clipped columns marked by red ticks above the panel, slice marks as
 * dashed vertical lines across all panels.
 *
 * @example
 * ```ts
 * import { historyView } from "./time_history.ts";
 * const e = { startTime: 0, rate: 4, length: 4, edges: Float64Array.from([0, 2, 4]),
 *   channels: [{ name: "a", unit: "V", min: Float64Array.from([-1, -2]), max: Float64Array.from([1, 2]), clipped: [1], warnings: [] }] };
 * const v = historyView("run", e, [{ by: "recording", start: 0.5 }]);
 * if ((v.svg.match(/class="slice-mark"/g) ?? []).length !== 1 || !v.svg.includes('class="clip-mark"')) throw new Error();
 * // A column is placed at the mean time of its samples: samples 0 and 1 at 4 Hz, 0.125 s.
 * if (v.spec.t[0] !== 0.125 || v.spec.marks[0].t !== 0.5) throw new Error();
 * ```
 */
export function historyView(
  title: string,
  envelope: TimeEnvelope,
  slices: readonly SliceMark[],
): { svg: string; spec: HistorySpec } {
  const { startTime, rate, edges } = envelope;
  const count = edges.length - 1;
  const t = Array.from(
    { length: count },
    (_, c) => startTime + (edges[c] + edges[c + 1] - 1) / 2 / rate,
  );
  const end = startTime + envelope.length / rate;
  const marks = slices.flatMap((s) => {
    const who = s.by === "recording" ? "slice" : s.by;
    return [
      ...(s.start !== undefined
        ? [{ t: s.start, label: `${who} start`, edge: "start" as const }]
        : []),
      ...(s.end !== undefined ? [{ t: s.end, label: `${who} end`, edge: "end" as const }] : []),
    ];
  });
  const spec: HistorySpec = {
    title,
    t: t.map((v) => compact(v) ?? 0),
    channels: envelope.channels.map((c) => ({
      name: c.name,
      unit: c.unit,
      min: Array.from(c.min, compact),
      max: Array.from(c.max, compact),
      clipped: c.clipped,
    })),
    marks,
  };
  const panels = envelope.channels.length;
  const height = TOP + panels * PANEL + (panels - 1) * GAP + BOTTOM;
  const x = scaleLinear().domain([startTime, end]).range([LEFT, WIDTH - RIGHT]);
  const parts: string[] = [];
  envelope.channels.forEach((c, k) => {
    const top = TOP + k * (PANEL + GAP);
    let lo = Infinity, hi = -Infinity;
    for (let i = 0; i < count; i++) {
      if (c.min[i] < lo) lo = c.min[i];
      if (c.max[i] > hi) hi = c.max[i];
    }
    if (!(hi > lo)) {
      lo -= 1;
      hi += 1;
    }
    const y = scaleLinear().domain([lo, hi]).range([top + PANEL - 4, top + 4]).nice();
    // The band: along the maxima left to right, back along the minima.
    let d = "";
    for (let i = 0; i < count; i++) {
      d += `${i === 0 ? "M" : "L"}${x(t[i]).toFixed(1)},${y(c.max[i]).toFixed(1)}`;
    }
    for (let i = count - 1; i >= 0; i--) d += `L${x(t[i]).toFixed(1)},${y(c.min[i]).toFixed(1)}`;
    const colour = PALETTE[k % PALETTE.length];
    parts.push(
      `<rect x="${LEFT}" y="${top}" width="${
        WIDTH - RIGHT - LEFT
      }" height="${PANEL}" fill="none" stroke="#5b6b7b"/>`,
      `<path class="envelope" d="${d}Z" fill="${colour}" fill-opacity="0.55" stroke="${colour}" stroke-width="0.6"/>`,
    );
    for (const v of y.ticks(3)) {
      parts.push(
        `<text x="${LEFT - 6}" y="${(y(v) + 4).toFixed(1)}" text-anchor="end" fill="#3d4b59">${
          escapeXml(formatNumber(v, 4))
        }</text>`,
      );
    }
    parts.push(
      `<text x="${LEFT + 6}" y="${top + 13}" fill="#22313f" font-weight="600">${
        escapeXml(c.unit === "" ? c.name : `${c.name} [${c.unit}]`)
      }</text>`,
    );
    for (const i of c.clipped) {
      const px = x(t[i]).toFixed(1);
      parts.push(
        `<line class="clip-mark" x1="${px}" x2="${px}" y1="${top}" y2="${
          top + 7
        }" stroke="#b02e1f" stroke-width="2"><title>clipped near ${
          formatNumber(t[i], 5)
        } s</title></line>`,
      );
    }
  });
  const bottom = height - BOTTOM;
  for (const v of x.ticks(10)) {
    parts.push(
      `<text x="${x(v).toFixed(1)}" y="${bottom + 14}" text-anchor="middle" fill="#3d4b59">${
        escapeXml(formatNumber(v, 5))
      }</text>`,
    );
  }
  parts.push(
    `<text x="${(LEFT + WIDTH - RIGHT) / 2}" y="${
      height - 8
    }" text-anchor="middle" fill="#22313f">Time [s]</text>`,
  );
  for (const m of marks) {
    if (m.t < startTime || m.t > end) continue;
    const px = x(m.t).toFixed(1);
    parts.push(
      `<g class="slice-mark"><line x1="${px}" x2="${px}" y1="${
        TOP - 4
      }" y2="${bottom}" stroke="#22313f" stroke-width="1.4" stroke-dasharray="6 3"/><text x="${px}" y="${
        TOP - 7
      }" text-anchor="${m.edge === "start" ? "start" : "end"}" fill="#22313f">${
        escapeXml(m.label)
      }</text></g>`,
    );
  }
  const svg =
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${WIDTH} ${height}" width="${WIDTH}" height="${height}" role="img" aria-label="${
      escapeXml(title)
    }" font-family="Helvetica, Arial, sans-serif" font-size="11">
<rect width="${WIDTH}" height="${height}" fill="#ffffff"/>
<text x="${LEFT}" y="16" font-size="13" font-weight="600" fill="#22313f">${escapeXml(title)}</text>
${parts.join("\n")}
</svg>`;
  return { svg, spec };
}

/**
 * JSON inside a script element: "<" escaped so that no "</script" can end it early.
 *
 * @example
 * ```ts
 * import { scriptJson } from "./time_history.ts";
 * const html = scriptJson({ name: "</script><b>" }, "data");
 * if (html.includes("</script><b>") || JSON.parse(html.slice(html.indexOf(">") + 1, html.lastIndexOf("<"))).name !== "</script><b>") throw new Error();
 * ```
 */
export function scriptJson(value: unknown, className: string): string {
  return `<script type="application/json" class="${className}">${
    JSON.stringify(value).replace(/</g, "\\u003c")
  }</script>`;
}
