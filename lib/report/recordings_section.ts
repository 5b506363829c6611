/**
 * The report's "Recordings" section: the raw time history of every
 * recording the plan reads, after the results they were read for.
 *
 * @module
 */
import { isAbsolute, join } from "node:path";
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { openRecordingStream } from "../io/recording_stream.ts";
import type { Plan } from "../plan/schema.ts";
import type { Figure } from "./figure.ts";
import type { ReportSection } from "./section.ts";
import {
  ENVELOPE_COLUMNS,
  historyView,
  planSlices,
  scriptJson,
  timeEnvelope,
} from "./time_history.ts";

/**
 * The report's "Recordings" section: the time history of every recording
 * the plan names, each read once more through the one reading path (with
 * its set-up and rate). A recording that cannot be read is named with the
 * reason instead of a picture.
 */
export async function recordingsSection(plan: Plan, planPath: string): Promise<ReportSection> {
  const base = planPath.replace(/[^/]*$/, "");
  const at = (p: string) => (isAbsolute(p) ? p : join(base, p));
  const figures: Figure[] = [];
  const problems: string[] = [];
  for (const [name, rec] of Object.entries(plan.recordings)) {
    // A CSV's layout options, as the analyses of the recording give them (their command-line
    // spelling, as cli/recording_options.ts maps it).
    const delimiters = { comma: ",", semicolon: ";", tab: "\t" } as const;
    const decimals = { point: ".", comma: "," } as const;
    let delimiter: "," | ";" | "\t" | undefined, decimal: "." | "," | undefined;
    for (const a of plan.analyses) {
      if (a.recording !== name) continue;
      const o = (a.options ?? {}) as Record<string, unknown>;
      if (o.delimiter === "comma" || o.delimiter === "semicolon" || o.delimiter === "tab") {
        delimiter ??= delimiters[o.delimiter];
      }
      if (o.decimal === "point" || o.decimal === "comma") decimal ??= decimals[o.decimal];
    }
    try {
      const stream = await openRecordingStream(at(rec.file), {
        setup: rec.setup === undefined ? undefined : at(rec.setup),
        rate: rec.rate,
        delimiter,
        decimal,
      });
      const envelope = await timeEnvelope(stream);
      const clipped = envelope.channels.filter((c) => c.clipped.length > 0).map((c) => c.name);
      const title = `${name}: ${
        rec.file.split("/").pop()
      }, ${envelope.channels.length} channel(s), ${
        formatNumber(envelope.length / envelope.rate, 4)
      } s at ${formatNumber(envelope.rate, 6)} Hz; min and max per column${
        clipped.length > 0 ? `; clipping marked on ${clipped.join(", ")}` : ""
      }`;
      const { svg, spec } = historyView(title, envelope, planSlices(plan, name));
      figures.push({
        name: `history_${name}`,
        svg,
        html: `<div class="static history-static">${svg}</div>${scriptJson(spec, "history-data")}`,
      });
    } catch (error) {
      if (!(error instanceof QuiverError)) throw error;
      problems.push(`${name}: ${error.message}`);
    }
  }
  return {
    heading: "Recordings",
    note:
      `The raw time history of each recording the plan reads, as the smallest and largest sample in each of at most ${ENVELOPE_COLUMNS} columns; dashed lines mark the plan's time slices, red ticks where the signal checks found clipping.${
        problems.length > 0 ? ` Not shown: ${problems.join("; ")}` : ""
      }`,
    figures,
  };
}
