/**
 * `quiver spectrum`: averaged, correctly scaled spectra of a recording.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { formatNumber } from "../lib/format_number.ts";
import { z } from "npm:zod@4.6.7";
import { AVERAGING_MODES } from "../lib/dsp/spectral_core.ts";
import { averagedSpectrum } from "../lib/dsp/averaged_spectrum.ts";
import { SPECTRUM_KINDS } from "../lib/dsp/spectrum_kinds.ts";
import { listOption, numberOption, type OptionSpec, parseCommandArgs, usageError } from "./args.ts";
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
export const summary = "averaged auto spectra (PSD, autopower, RMS or peak) of a recording";

/** The command's help text. */
export const help = `quiver spectrum IN [options]

Averaged one-sided spectra of the channels of IN (CSV or WAV), by Welch's
method: segments, detrend, window, FFT, average.

Analysis:
  --channels a,b       channels to analyse, in output order       (default all)
${SEGMENT_HELP}
  --kind K             psd (unit^2/Hz) | power (unit^2 per line) |
                       rms (unit RMS per line) | peak (unit peak per line)  (default psd)
  --average A          ${AVERAGING_MODES.join(" | ")}           (default linear)
  --tau S              time constant of exponential averaging, seconds  (default 1)

${RECORDING_HELP}

${OUTPUT_HELP}

CSV columns: frequency_hz, then one per channel headed "name [unit]".
JSON: the same columns plus metadata (rate, block, df, window, overlap,
averages, ...).
`;

/** zod schema of the options. */
export const schema = z.strictObject({
  channels: listOption().optional(),
  ...segmentOptionsShape,
  kind: z.enum(SPECTRUM_KINDS).optional(),
  average: z.enum(AVERAGING_MODES).optional(),
  tau: numberOption().pipe(z.number().positive("must be a positive number of seconds")).optional(),
  ...outputOptionsShape,
  ...recordingOptionsShape,
}).refine(oneBlockChoice, {
  message: "give --block or --resolution, not both",
}).refine((v) => v.tau === undefined || v.average === "exponential", {
  message: "--tau applies to --average exponential only",
});

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  channels: { type: "string" },
  ...SEGMENT_OPTIONS,
  kind: { type: "string" },
  average: { type: "string" },
  tau: { type: "string" },
  ...OUTPUT_OPTIONS,
  ...RECORDING_OPTIONS,
};

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`spectrum takes one recording, got ${positionals.length}`);
  }
  const [input] = positionals;
  const analysis = {
    channels: values.channels,
    block: values.block,
    resolution: values.resolution,
    overlap: values.overlap,
    window: values.window,
    detrend: values.detrend,
    kind: values.kind,
    average: values.average,
    tau: values.tau,
  };
  const table = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => averagedSpectrum(stream, analysis),
  );
  await writeResult(table, input, values);
  for (const w of table.metadata.warnings as string[]) {
    toStderr(`quiver spectrum: warning: ${w}\n`);
  }
  const m = table.metadata;
  toStderr(
    `spectrum: ${
      table.columns.length - 1
    } channel(s), ${m.kind}, ${m.averages} average(s) of ${m.block} samples, ` +
      `df ${formatNumber(m.df_hz, 6)} Hz, ${m.window} window${
        values.out !== undefined ? ` -> ${values.out}` : ""
      }\n`,
  );
}
