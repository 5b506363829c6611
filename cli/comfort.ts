/**
 * `quiver comfort`: whole-body vibration (ISO 2631-1) of a road-test recording.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { toStderr } from "./terminal.ts";
import { listOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { commandHelp, option, shapeOf, specOf } from "./option_table.ts";
import { comfortAnalysis, SAFETY_NOTE } from "../lib/comfort/comfort_analysis.ts";
import { VIBRATION_WEIGHTINGS } from "../lib/comfort/vibration_weighting.ts";
import { LOCATIONS, PURPOSES } from "../lib/comfort/axis_factors.ts";
import { VIBRATION_OUTPUTS } from "../lib/comfort/comfort_descriptor.ts";
import { formatNumber } from "../lib/format_number.ts";

/** One-line summary for the command list. */
export const summary =
  "whole-body vibration (ISO 2631-1): a_w, MTVV, VDV, crest factor, vector sum";

const channel = (axis: string) =>
  option(z.string().min(1), { value: "CH", help: `channel of the ${axis} axis` });

const ANALYSIS = {
  weighting: option(z.enum(VIBRATION_WEIGHTINGS), {
    value: "W",
    help: `${VIBRATION_WEIGHTINGS.join(" | ")}: every channel weighted by W`,
  }),
  channels: option(listOption(), {
    value: "a,b",
    help: "channels (with --weighting)",
    default: "all",
  }),
  x: channel("x"),
  y: channel("y"),
  z: channel("z"),
  location: option(z.enum(LOCATIONS), { value: "L", help: LOCATIONS.join(" | ") }),
  purpose: option(z.enum(PURPOSES), { value: "P", help: PURPOSES.join(" | ") }),
};

const OUTPUT = { ...OUTPUT_TABLE, ...VIBRATION_OUTPUTS };
const TABLE = { ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT };

/** The command's help text. */
export const help = commandHelp({
  usage: `quiver comfort IN --weighting W [--channels a,b] [options]
       quiver comfort IN --x CH --y CH --z CH --location L --purpose P [options]`,
  about: `Frequency-weighted acceleration (ISO 2631-1 Annex A; wh: ISO 5349-1) of
each channel, or of three axes with the weightings and factors k ISO 2631-1
gives for the location and purpose (seated: Wd, Wd, Wk; k = 1 for comfort,
1.4 on x and y for health) and the vector sum a_v = √Σ(k·a_w)². One row per
channel or axis, then a sum row: axis, channel, weighting, k, aw [m/s^2]
(r.m.s.), mtvv [m/s^2] (maximum running r.m.s., τ = 1 s), vdv [m/s^1.75],
crest_factor, mtvv_ratio (MTVV/a_w), vdv_ratio (VDV/(a_w·T^¼)) and flags
where the basic method underestimates (crest factor > 9, ratios > 1.5 and
1.75). Channels must be accelerations (g and mm/s^2 are converted). The
weighting filters need a rate of 4× the band's upper limit (400 Hz; wh
5035.6 Hz; wf 5.04 Hz); the JSON records their worst deviation.`,
  groups: [["Analysis", ANALYSIS], [RECORDING_HEADING, RECORDING_TABLE], ["Output", OUTPUT]],
  notes: SAFETY_NOTE.replace(/(.{1,72})(\s+|$)/g, "$1\n").trimEnd(),
});

type Values = { weighting?: unknown; channels?: unknown; x?: unknown; y?: unknown; z?: unknown };
const axesGiven = (v: Values) => [v.x, v.y, v.z].some((a) => a !== undefined);

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE))
  .refine((v) => (v.weighting !== undefined) !== axesGiven(v), {
    message: "give --weighting (with --channels) or --x, --y and --z, one of them",
  })
  .refine((v) => !axesGiven(v) || [v.x, v.y, v.z].every((a) => a !== undefined), {
    message: "--x, --y and --z go together",
  })
  .refine((v) => !axesGiven(v) || (v.location !== undefined && v.purpose !== undefined), {
    message: "--x, --y and --z need --location and --purpose",
  })
  .refine((v) => axesGiven(v) || (v.location === undefined && v.purpose === undefined), {
    message: "--location and --purpose go with --x, --y and --z",
  })
  .refine((v) => !axesGiven(v) || v.channels === undefined, {
    message: "--channels goes with --weighting, not with --x, --y and --z",
  });

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`comfort takes one recording, got ${positionals.length}`);
  }
  if (values.out !== undefined && values.out === values["history-out"]) {
    usageError("--out and --history-out must name different files");
  }
  const [input] = positionals;
  const result = await analyseRecording(input, toReadOptions(values), (stream) =>
    comfortAnalysis(
      stream,
      values.weighting !== undefined
        ? { weighting: values.weighting, channels: values.channels }
        : {
          axes: { x: values.x!, y: values.y!, z: values.z! },
          location: values.location!,
          purpose: values.purpose!,
        },
    ));
  await writeResult(result.table, input, values);
  if (values["history-out"] !== undefined) {
    await writeResult(result.history, input, { out: values["history-out"] });
  }
  for (const w of result.warnings) toStderr(`quiver comfort: warning: ${w}\n`);
  for (const r of result.table.metadata.rows) {
    const name = r.axis === "" ? r.channel : `${r.axis} ${r.channel}`.trim();
    const flags = r.flags.length > 0 ? ` [${r.flags.join(", ")}]` : "";
    toStderr(
      `${name}: aw ${formatNumber(r.aw)} m/s^2, vdv ${formatNumber(r.vdv)} m/s^1.75${flags}\n`,
    );
  }
  toStderr(`quiver comfort: ${SAFETY_NOTE}\n`);
}
