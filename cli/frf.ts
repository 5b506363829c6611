/**
 * `quiver frf`: averaged FRFs with coherence from continuous excitation.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { formatNumber } from "../lib/format_number.ts";
import { z } from "npm:zod@4.6.7";
import { ESTIMATORS } from "../lib/frf/estimators.ts";
import { FRF_FORMS } from "../lib/frf/forms.ts";
import { frequencyResponse } from "../lib/frf/frf_analysis.ts";
import { listOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { oneBlockChoice, OUTPUT_TABLE, SEGMENT_TABLE } from "./segment_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";

/** One-line summary for the command list. */
export const summary =
  "FRFs (H1, H2, Hv) with coherence from shaker or other continuous excitation";

const CHANNELS = {
  input: option(z.string().min(1), {
    value: "CH",
    help: "the excitation (force) channel",
    required: true,
  }),
  outputs: option(listOption(), {
    value: "a,b",
    help: "the response channels",
    required: true,
  }),
};

const ANALYSIS = {
  estimator: option(z.enum(ESTIMATORS), {
    value: "E",
    help:
      "h1 (Gxy/Gxx, unbiased by output noise) |\nh2 (Gyy/Gyx, unbiased by input noise) |\nhv (total least squares, between the two)",
    default: "h1",
  }),
  ...SEGMENT_TABLE,
  form: option(z.enum(FRF_FORMS), {
    value: "F",
    help: `${
      FRF_FORMS.join(" | ")
    }: convert by jw from the\nmeasured form (responses in m/s^2, m/s or m)`,
    default: "as measured",
  }),
};

const TABLE = { ...CHANNELS, ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT_TABLE };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver frf IN --input FORCE --outputs a,b [options]",
  about: `Averaged frequency response functions of each response channel against one
input channel (shaker random, burst random, sine sweep), with ordinary
coherence and the normalised random error of |H| (Bendat & Piersol).`,
  groups: [
    ["Channels", CHANNELS],
    ["Analysis", ANALYSIS],
    [RECORDING_HEADING, RECORDING_TABLE],
    ["Output", OUTPUT_TABLE],
  ],
  notes: `CSV columns: frequency_hz, then per response R: R_re, R_im, R_mag,
R_phase_deg, R_coherence, R_random_error. When a conversion divides by jw,
the 0 Hz line is left out (undefined there).`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE)).refine(oneBlockChoice, {
  message: "give --block or --resolution, not both",
});

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`frf takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const analysis = {
    ...libraryOptions(CHANNELS, values),
    ...libraryOptions(ANALYSIS, values),
  };
  const { table, warnings } = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => frequencyResponse(stream, analysis),
  );
  await writeResult(table, input, values);
  for (const warning of warnings) toStderr(`quiver frf: warning: ${warning}\n`);
  const m = table.metadata;
  toStderr(
    `frf: ${values.outputs.length} response(s) against ${values.input}, ${m.estimator}, ` +
      `${m.averages} average(s) of ${m.block} samples, df ${formatNumber(m.df_hz, 6)} Hz` +
      `${values.out !== undefined ? ` -> ${values.out}` : ""}\n`,
  );
}
