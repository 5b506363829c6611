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
import { listOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { oneBlockChoice, OUTPUT_TABLE, SEGMENT_TABLE } from "./segment_options.ts";
import { RECORDING_FORMAT_NAMES } from "../lib/io/formats/mod.ts";

/** One-line summary for the command list. */
export const summary = "averaged autospectra (PSD, power spectrum, RMS or peak) of a recording";

/** The options that feed the analysis. */
const ANALYSIS = {
  channels: option(listOption(), {
    value: "a,b",
    help: "channels to analyse, in output order",
    default: "all",
  }),
  ...SEGMENT_TABLE,
  kind: option(z.enum(SPECTRUM_KINDS), {
    value: "K",
    help:
      "psd (unit^2/Hz) | power (unit^2 per line) |\nrms (unit RMS per line) | peak (unit peak per line)",
    default: "psd",
  }),
  average: option(z.enum(AVERAGING_MODES), {
    value: "A",
    help: AVERAGING_MODES.join(" | "),
    default: "linear",
  }),
  tau: option(numberOption().pipe(z.number().positive("must be a positive number of seconds")), {
    value: "S",
    help: "time constant of exponential averaging, seconds",
    default: "1",
  }),
};

const TABLE = { ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT_TABLE };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver spectrum IN [options]",
  about: `Averaged one-sided spectra of the channels of IN (${RECORDING_FORMAT_NAMES}), by Welch's
method: segments, detrend, window, FFT, average.`,
  groups: [["Analysis", ANALYSIS], [RECORDING_HEADING, RECORDING_TABLE], ["Output", OUTPUT_TABLE]],
  notes: `CSV columns: frequency_hz, then one per channel headed "name [unit]".
JSON: the same columns plus metadata (rate, block, df, window, overlap,
averages, ...).`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE)).refine(oneBlockChoice, {
  message: "give --block or --resolution, not both",
}).refine((v) => v.tau === undefined || v.average === "exponential", {
  message: "--tau applies to --average exponential only",
});

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`spectrum takes one recording, got ${positionals.length}`);
  }
  const [input] = positionals;
  const table = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => averagedSpectrum(stream, libraryOptions(ANALYSIS, values)),
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
