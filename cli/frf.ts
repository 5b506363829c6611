/**
 * `quiver frf`: averaged FRFs with coherence from continuous excitation.
 *
 * @module
 */
import { FRF_OUTPUTS } from "../lib/frf/frf_descriptor.ts";
import { toStderr } from "./terminal.ts";
import { formatNumber } from "../lib/format_number.ts";
import { z } from "npm:zod@4.6.7";
import { ESTIMATORS } from "../lib/frf/estimators.ts";
import { FRF_FORMS } from "../lib/frf/forms.ts";
import { frequencyResponse } from "../lib/frf/frf_analysis.ts";
import { multipleInputFrf } from "../lib/frf/multiple_input.ts";
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
    help: "the excitation (force) channel (or --inputs)",
  }),
  inputs: option(listOption(), {
    value: "a,b,c",
    help:
      "several excitation channels at once: the FRF matrix by\nleast squares (h1), with multiple coherence",
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

// Written with several inputs only: declared with the analysis (lib/frf/frf_descriptor.ts).
const SEVERAL = FRF_OUTPUTS;

const TABLE = { ...CHANNELS, ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT_TABLE, ...SEVERAL };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver frf IN (--input FORCE | --inputs f1,f2,…) --outputs a,b [options]",
  about: `Averaged frequency response functions of each response channel against one
input channel (shaker random, burst random, sine sweep), with ordinary
coherence and the normalised random error of |H| (Bendat & Piersol).`,
  groups: [
    ["Channels", CHANNELS],
    ["Analysis", ANALYSIS],
    [RECORDING_HEADING, RECORDING_TABLE],
    ["Output", OUTPUT_TABLE],
    ["Several inputs", SEVERAL],
  ],
  notes: `CSV columns: frequency_hz, then per response R: R_re, R_im, R_mag,
R_phase_deg, R_coherence, R_random_error. When a conversion divides by jw,
the 0 Hz line is left out (undefined there).
With --inputs (two or more; one name is the same as --input): only h1, no
--form; columns per output Y and input X: Y/X_re, Y/X_im, Y/X_mag,
Y/X_phase_deg, then Y_multiple_coherence, and gxx_condition (condition number
of the inputs' cross-spectral matrix; a warning names the lines above 1000).
Channel names must not hold "/".
A transient input (burst random, impacts: quiet below -20 dB re its RMS over
at least 10 % of the record) is recorded in the metadata (excitation), and a
warning names the window, block, overlap and start that suit it.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE)).refine(oneBlockChoice, {
  message: "give --block or --resolution, not both",
}).refine((v) => (v.input === undefined) !== (v.inputs === undefined), {
  message: "give --input (one excitation) or --inputs (several), one of the two",
}).refine(
  (v) =>
    (v.inputs?.length ?? 1) > 1 ||
    (v["partial-out"] === undefined && v["principal-out"] === undefined),
  { message: "--partial-out and --principal-out need --inputs with two or more channels" },
).refine((v) => (v.inputs?.length ?? 1) === 1 || v.form === undefined, {
  message: "--form is not available with several inputs; convert the responses first",
});

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`frf takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const inputs = values.inputs ?? [values.input as string];
  if (inputs.length > 1) return await runSeveral(input, inputs, values);
  const analysis = {
    ...libraryOptions(CHANNELS, values),
    ...libraryOptions(ANALYSIS, values),
    input: inputs[0],
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
    `frf: ${values.outputs.length} response(s) against ${inputs[0]}, ${m.estimator}, ` +
      `${m.averages} average(s) of ${m.block} samples, df ${formatNumber(m.df_hz, 6)} Hz` +
      `${values.out !== undefined ? ` -> ${values.out}` : ""}\n`,
  );
}

/** `--inputs` with several channels: the FRF matrix and its companions. */
async function runSeveral(
  input: string,
  inputs: readonly string[],
  values: z.infer<typeof schema>,
): Promise<void> {
  const { estimator, form: _form, inputs: _inputs, input: _input, ...rest } = {
    ...libraryOptions(CHANNELS, values),
    ...libraryOptions(ANALYSIS, values),
  };
  if (estimator !== undefined && estimator !== "h1") {
    usageError(`with several inputs only --estimator h1 is available, got ${estimator}`);
  }
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => multipleInputFrf(stream, { ...rest, inputs, outputs: values.outputs }),
  );
  await writeResult(result.table, input, values);
  const extra = [
    [values["partial-out"], result.partialTable],
    [values["principal-out"], result.principalTable],
  ] as const;
  for (const [path, table] of extra) {
    if (path !== undefined) {
      await writeResult(table, input, { ...values, out: path, format: undefined });
    }
  }
  for (const warning of result.warnings) toStderr(`quiver frf: warning: ${warning}\n`);
  const m = result.table.metadata;
  toStderr(
    `frf: ${values.outputs.length} response(s) against ${inputs.length} inputs (${
      inputs.join(", ")
    }), h1, ${m.averages} average(s) of ${m.block} samples, df ${formatNumber(m.df_hz, 6)} Hz` +
      `${values.out !== undefined ? ` -> ${values.out}` : ""}\n`,
  );
}
