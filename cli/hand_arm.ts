/**
 * `quiver hand-arm`: hand-arm vibration (ISO 5349-1) of a recording.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { toStderr } from "./terminal.ts";
import { numberOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { commandHelp, option, shapeOf, specOf } from "./option_table.ts";
import { handArmAnalysis, SAFETY_NOTE } from "../lib/comfort/comfort_analysis.ts";
import { VIBRATION_OUTPUTS } from "../lib/comfort/comfort_descriptor.ts";
import { formatNumber } from "../lib/format_number.ts";

/** One-line summary for the command list. */
export const summary = "hand-arm vibration (ISO 5349-1): Wh per axis, a_hv, A(8)";

const channel = (axis: string) =>
  option(z.string().min(1), { value: "CH", help: `channel of the ${axis} axis`, required: true });

const ANALYSIS = {
  x: channel("x"),
  y: channel("y"),
  z: channel("z"),
  "exposure-hours": option(
    numberOption().pipe(z.number().positive("must be a positive number of hours")),
    { value: "H", help: "daily exposure time, for A(8) = a_hv·√(H/8)" },
  ),
};

const OUTPUT = { ...OUTPUT_TABLE, ...VIBRATION_OUTPUTS };
const TABLE = { ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver hand-arm IN --x CH --y CH --z CH [--exposure-hours H] [options]",
  about: `Hand-arm vibration (ISO 5349-1): each axis weighted by Wh (ISO 8041-1),
the vibration total value a_hv = √(a_hwx² + a_hwy² + a_hwz²) in the sum row
and, with --exposure-hours, the daily exposure A(8) = a_hv·√(T/8 h) in the
JSON metadata and on stderr. Columns as for comfort (k = 1). Channels must
be accelerations (g and mm/s^2 are converted); Wh needs a sample rate of at
least 5035.6 Hz (4 × its upper band limit of 1258.9 Hz).`,
  groups: [["Analysis", ANALYSIS], [RECORDING_HEADING, RECORDING_TABLE], ["Output", OUTPUT]],
  notes: SAFETY_NOTE.replace(/(.{1,72})(\s+|$)/g, "$1\n").trimEnd(),
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`hand-arm takes one recording, got ${positionals.length}`);
  }
  if (values.out !== undefined && values.out === values["history-out"]) {
    usageError("--out and --history-out must name different files");
  }
  const [input] = positionals;
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) =>
      handArmAnalysis(stream, {
        axes: { x: values.x, y: values.y, z: values.z },
        exposureHours: values["exposure-hours"],
      }),
  );
  await writeResult(result.table, input, values);
  if (values["history-out"] !== undefined) {
    await writeResult(result.history, input, { out: values["history-out"] });
  }
  for (const w of result.warnings) toStderr(`quiver hand-arm: warning: ${w}\n`);
  const m = result.table.metadata;
  const a8 = m.a8 === null ? "" : `, A(8) ${formatNumber(m.a8)} m/s^2 for ${m.exposure_hours} h`;
  toStderr(`hand-arm: a_hv ${formatNumber(m.a_hv)} m/s^2${a8}\n`);
  toStderr(`quiver hand-arm: ${SAFETY_NOTE}\n`);
}
