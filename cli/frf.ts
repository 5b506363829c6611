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
import { listOption, type OptionSpec, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HELP,
  RECORDING_OPTIONS,
  recordingOptionsShape,
  toReadOptions,
} from "./recording_options.ts";
import {
  oneBlockChoice,
  OUTPUT_HELP,
  OUTPUT_OPTIONS,
  outputOptionsShape,
  SEGMENT_HELP,
  SEGMENT_OPTIONS,
  segmentOptionsShape,
} from "./segment_options.ts";

/** One-line summary for the command list. */
export const summary =
  "FRFs (H1, H2, Hv) with coherence from shaker or other continuous excitation";

/** The command's help text. */
export const help = `quiver frf IN --input FORCE --outputs a,b [options]

Averaged frequency response functions of each response channel against one
input channel (shaker random, burst random, sine sweep), with ordinary
coherence and the normalised random error of |H| (Bendat & Piersol).

Channels:
  --input CH           the excitation (force) channel                (required)
  --outputs a,b        the response channels                        (required)

Analysis:
  --estimator E        h1 (Gxy/Gxx, unbiased by output noise) |
                       h2 (Gyy/Gyx, unbiased by input noise) |
                       hv (total least squares, between the two)   (default h1)
${SEGMENT_HELP}
  --form F             ${FRF_FORMS.join(" | ")}: convert by jw from the
                       measured form (responses in m/s^2, m/s or m)  (default: as measured)

${RECORDING_HELP}

${OUTPUT_HELP}

CSV columns: frequency_hz, then per response R: R_re, R_im, R_mag,
R_phase_deg, R_coherence, R_random_error. When a conversion divides by jw,
the 0 Hz line is left out (undefined there).
`;

/** zod schema of the options. */
export const schema = z.strictObject({
  input: z.string().min(1),
  outputs: listOption(),
  estimator: z.enum(ESTIMATORS).optional(),
  form: z.enum(FRF_FORMS).optional(),
  ...segmentOptionsShape,
  ...outputOptionsShape,
  ...recordingOptionsShape,
}).refine(oneBlockChoice, { message: "give --block or --resolution, not both" });

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  input: { type: "string" },
  outputs: { type: "string" },
  estimator: { type: "string" },
  form: { type: "string" },
  ...SEGMENT_OPTIONS,
  ...OUTPUT_OPTIONS,
  ...RECORDING_OPTIONS,
};

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`frf takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const analysis = {
    input: values.input,
    outputs: values.outputs,
    estimator: values.estimator,
    form: values.form,
    block: values.block,
    resolution: values.resolution,
    overlap: values.overlap,
    window: values.window,
    detrend: values.detrend,
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
